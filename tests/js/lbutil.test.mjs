// Unit tests of the page helpers under Node's own test runner (node --test).
import { test } from "node:test";
import assert from "node:assert/strict";
import { all, b64decode, b64encode, esc, messageOf, one, si } from "../../lampbook/assets/lbutil.js";

test("esc escapes the five HTML characters and nothing else", () => {
  assert.equal(esc(`<a href="x">'&'</a>`), "&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
  assert.equal(esc("4.7 µF · 230 V"), "4.7 µF · 230 V");
  assert.equal(esc(42), "42");
});

test("base64url round trip of design text with non-ASCII units", () => {
  const text = 'name = "Test"\n[array]\nballast = "47 Ω"\n[dropper]\ncapacitance = "1.5 µF"\n';
  const enc = b64encode(text);
  assert.match(enc, /^[A-Za-z0-9_-]+$/);
  assert.equal(b64decode(enc), text);
  // checked against Node's own base64url codec, an independent implementation
  assert.equal(enc, Buffer.from(text, "utf8").toString("base64url"));
});

test("b64decode refuses what is not a design link", () => {
  assert.throws(() => b64decode("not base64!"));
  assert.throws(() => b64decode(Buffer.from([0xff, 0xfe, 0xfd]).toString("base64url")));
});

test("si picks the prefix and keeps three figures", () => {
  assert.equal(si(0.0667, "A"), "66.7 mA");
  assert.equal(si(7.349, "W"), "7.35 W");
  assert.equal(si(1.47e-6, "F"), "1.47 µF");
  assert.equal(si(0, "V"), "0 V");
  assert.equal(si(NaN, "V"), "–");
  assert.equal(si(2200, "Ω"), "2.2 kΩ");
});

test("one finds the element the markup always has, and names the selector when it is missing", () => {
  const el = { id: "x" };
  // a stand-in with the two methods one() and all() call, not a whole DOM node
  const fake = { querySelector: (/** @type {string} */ sel) => (sel === ".lb-plot" ? el : null), querySelectorAll: () => [el, el] };
  const root = /** @type {ParentNode} */ (/** @type {unknown} */ (fake));
  assert.equal(one(root, ".lb-plot"), el);
  assert.throws(() => one(root, ".lb-bench-app"), /no \.lb-bench-app in the page/);
  assert.deepEqual([...all(root, ".any")], [el, el]);
});

test("messageOf reads what was thrown, an Error or anything else", () => {
  assert.equal(messageOf(new Error("engine stopped: gone")), "engine stopped: gone");
  assert.equal(messageOf("plain"), "plain");
  assert.equal(messageOf(undefined), "undefined");
});
