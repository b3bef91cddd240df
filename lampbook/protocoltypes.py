"""TypeScript declarations of the page protocol, written from :mod:`lampcalc.protocol`.

The requests and answers of ``lampcalc.api.handle`` are declared once, as
``TypedDict``s in the core; this walks them and writes
``lampbook/assets/protocol.d.ts``, which the page scripts name in their JSDoc
and ``tsc`` checks them against. The file is checked in, and
``tests/test_protocol.py`` asserts it equals what this writes now.

Regenerate after changing the protocol::

    .venv/bin/python -m lampbook.protocoltypes
"""

from __future__ import annotations

import ast
import inspect
import sys
import types
import typing
from pathlib import Path

from lampcalc import protocol

TARGET = Path(__file__).resolve().parent / "assets" / "protocol.d.ts"

HEADER = """\
// The page protocol: what lampcalc.api.handle reads and writes (the worker passes it through as JSON).
// Written by lampbook/protocoltypes.py from calc/lampcalc/protocol.py; do not edit by hand.
// Regenerate with: .venv/bin/python -m lampbook.protocoltypes
"""

# the answer a request gets, by its type (a request's kind picks it; a compute request may leave the kind out)
TRAILER = """\
/** The answer a request gets: its kind's answer, or a refusal naming the problems. */
export type AnswerTo<R extends Request> = R extends { kind: infer K }
  ? K extends keyof Answers ? Answers[K] : Refusal
  : Answers["compute"];
"""


class ProtocolTypeError(TypeError):
    """A protocol annotation with no TypeScript counterpart here."""


def _is_typeddict(tp: object) -> typing.TypeGuard[type]:
    return isinstance(tp, type) and typing.is_typeddict(tp)


def ts_type(tp: object) -> str:
    """The TypeScript spelling of one annotation."""
    if tp is type(None) or tp is None:
        return "null"
    if tp is str:
        return "string"
    if tp is bool:
        return "boolean"
    if tp in (int, float):
        return "number"
    if tp in (typing.Any, object):
        return "unknown"
    if _is_typeddict(tp):
        return tp.__name__
    origin = typing.get_origin(tp)
    args = typing.get_args(tp)
    if origin is typing.Literal:
        return " | ".join(_literal(a) for a in args)
    if origin in (typing.Union, types.UnionType):
        return " | ".join(ts_type(a) for a in args)
    if origin is list:
        inner = ts_type(args[0])
        return f"({inner})[]" if " | " in inner else f"{inner}[]"
    if origin is tuple:
        return "[" + ", ".join(ts_type(a) for a in args) + "]"
    if origin is dict:
        return f"Record<{ts_type(args[0])}, {ts_type(args[1])}>"
    raise ProtocolTypeError(f"no TypeScript form for {tp!r}")


def _literal(value: object) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(value, int):
        return str(value)
    raise ProtocolTypeError(f"no TypeScript literal for {value!r}")


def _comments(cls: type) -> dict[str, str]:
    """The comment at the end of each field's line in the class's source."""
    lines, _ = inspect.getsourcelines(cls)
    out = {}
    for line in lines:
        code, sep, comment = line.partition("  # ")
        name, colon, _ = code.strip().partition(":")
        if sep and colon and name.isidentifier():
            out[name] = comment.strip()
    return out


def _doc(text: str | None, indent: str = "") -> str:
    if not text:
        return ""
    body = " ".join(inspect.cleandoc(text).split())
    return f"{indent}/** {body} */\n"


def _interface(cls: type) -> str:
    hints = typing.get_type_hints(cls, include_extras=True)
    notes = _comments(cls)
    doc = cls.__doc__ if cls.__doc__ and not cls.__doc__.startswith(cls.__name__ + "(") else None
    out = _doc(doc) + f"export interface {cls.__name__} {{\n"
    for name, tp in hints.items():
        optional = typing.get_origin(tp) is typing.NotRequired
        if optional:
            tp = typing.get_args(tp)[0]
        out += _doc(notes.get(name), "  ")
        out += f"  {name}{'?' if optional else ''}: {ts_type(tp)};\n"
    return out + "}\n"


def _aliases() -> list[tuple[str, object]]:
    """The module's type aliases (unions), in the order they are written."""
    tree = ast.parse(inspect.getsource(protocol))
    out = []
    for node in tree.body:
        if isinstance(node, ast.Assign) and len(node.targets) == 1 and isinstance(node.targets[0], ast.Name):
            name = node.targets[0].id
            value = getattr(protocol, name)
            if typing.get_origin(value) in (typing.Union, types.UnionType):
                out.append((name, value))
    return out


def declarations() -> str:
    """The whole protocol.d.ts, as text."""
    parts = [HEADER]
    for name, value in vars(protocol).items():
        if _is_typeddict(value) and value.__module__ == protocol.__name__ and not name.startswith("_"):
            parts.append(_interface(value))
    for name, value in _aliases():
        parts.append(f"export type {name} = {ts_type(value)};\n")
    answers = "".join(
        f"  {kind}: {answer.__name__} | Refusal;\n" for kind, (_request, answer) in protocol.ANSWERS.items()
    )
    parts.append(f"/** The answer each request kind gets. */\nexport interface Answers {{\n{answers}}}\n")
    parts.append(TRAILER)
    return "\n".join(parts)


def main(argv: list[str] | None = None) -> int:
    """Write protocol.d.ts (``--check``: only say whether it is up to date)."""
    args = sys.argv[1:] if argv is None else argv
    text = declarations()
    if "--check" in args:
        if TARGET.read_text(encoding="utf-8") != text:
            print(f"{TARGET} is out of date: run python -m lampbook.protocoltypes", file=sys.stderr)
            return 1
        return 0
    TARGET.write_text(text, encoding="utf-8")
    print(f"wrote {TARGET}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
