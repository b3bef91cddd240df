// The page protocol: what lampcalc.api.handle reads and writes (the worker passes it through as JSON).
// Written by lampbook/protocoltypes.py from calc/lampcalc/protocol.py; do not edit by hand.
// Regenerate with: .venv/bin/python -m lampbook.protocoltypes

/** One problem with the input: the field, the value given, what was expected. */
export interface ErrorItem {
  field: string;
  value: string;
  expected: string;
  message: string;
}

/** The answer to any request the core cannot answer: every problem found. */
export interface Refusal {
  ok: false;
  errors: ErrorItem[];
  /** a compute request's calculator */
  calculator?: string;
}

export interface DescribeRequest {
  kind: "describe";
}

export interface ParamDecl {
  name: string;
  label: string;
  /** a units dimension, "choice", "region" or "text" */
  dim: string;
  /** as typed; null: optional, absent unless given */
  default: string | null;
  imperial: string | null;
  help: string;
  choices: string[];
  modes: string[];
  /** SI */
  minimum: number | null;
  /** SI */
  maximum: number | null;
  secondary: boolean;
}

export interface OutputDecl {
  name: string;
  label: string;
  dim: string;
  help: string;
  modes: string[];
}

export interface ColumnDecl {
  name: string;
  label: string;
  dim: string;
}

/** A plot the page may draw: one output against one input swept about its value. */
export interface SweepDecl {
  name: string;
  /** the input swept */
  param: string;
  /** the output drawn */
  output: string;
  /** the figure's caption */
  label: string;
  x_title: string;
  y_title: string;
  /** SI symbol of the input */
  x_unit: string;
  /** SI symbol of the output */
  y_unit: string;
  /** the sweep runs from low to high times the input's value */
  low: number;
  high: number;
  /** factors spaced evenly on a log scale (and a log axis) */
  log: boolean;
  points: number;
}

export interface CalculatorDecl {
  name: string;
  title: string;
  summary: string;
  mains: boolean;
  mains_modes: string[];
  mode: string | null;
  params: ParamDecl[];
  outputs: OutputDecl[];
  columns: ColumnDecl[];
  plots: SweepDecl[];
  main: string[];
}

/** What a calculator block in a page carries as JSON beside its form: the declaration the page builds it from and the answer computed at build time (shown until the engine answers). */
export interface CalculatorBlock {
  /** the block's element id, lb-<calculator>-<n> */
  id: string;
  calculator: string;
  declaration: CalculatorDecl;
  answer: ComputeAnswer;
}

export interface RegionPreset {
  voltage: string;
  frequency: string;
  tolerance: string;
  label: string;
  source: string;
}

export interface DescribeAnswer {
  ok: true;
  calculators: CalculatorDecl[];
  regions: Record<string, RegionPreset>;
}

export interface ComputeRequest {
  /** the default kind */
  kind?: "compute";
  calculator: string;
  /** as typed, by input name; a blank is an error for an input with a usual value */
  inputs: Record<string, string>;
}

export interface ComputeAnswer {
  calculator: string;
  ok: true;
  /** SI, by output name */
  values: Record<string, number | string | null>;
  /** the same values formatted for reading */
  display: Record<string, string>;
  /** the table of options */
  rows: (Record<string, number | string | null>)[];
  rows_display: Record<string, string>[];
  rows_html?: string;
  /** the outputs this answer's mode includes */
  applies: string[];
  notes: string[];
  warnings: string[];
  cautions: string[];
  /** paths of numbers given as null */
  unbounded?: string[];
  json_note?: string;
}

export interface SweepRequest {
  kind: "sweep";
  calculator: string;
  /** a SweepDecl name of the calculator */
  plot: string;
  inputs: Record<string, string>;
}

export interface SweepAnswer {
  ok: true;
  calculator: string;
  plot: string;
  /** the swept input's value as given (SI) */
  centre: number;
  /** (input, output) in SI, the points that have an answer */
  points: [number, number][];
}

export interface CheckRequest {
  kind: "check";
  /** the design file's text */
  toml: string;
  waveforms?: boolean;
}

export interface StudyRequest {
  kind: "study";
  toml: string;
  samples?: number;
  seed?: number;
}

export interface SheetRequest {
  kind: "sheet";
  toml: string;
}

/** The figures every corner of a review has; a mains design's corners add the bus, ripple, flicker, part stresses and mains quality (``check --json``). */
export interface OperatingPoint {
  led_current_avg_A: number;
  string_current_avg_A: number;
  input_power_W: number;
  led_power_W: number;
  /** mains designs (a fraction) */
  power_factor?: number;
  /** mains designs, 0-100 */
  percent_flicker_pct?: number;
}

export interface CheckItem {
  id: string;
  status: "pass" | "warn" | "fail";
  message: string;
  why: string;
  source: string;
  values: Record<string, number | string>;
  corner?: Record<string, string>;
  would_pass?: string;
}

export interface CheckAnswer {
  ok: true;
  name: string;
  revision: string;
  date: string;
  description: string;
  kind: "mains" | "cv";
  nominal: OperatingPoint;
  low: OperatingPoint;
  high: OperatingPoint;
  worst_high: OperatingPoint;
  /** constant-voltage designs */
  worst_low?: OperatingPoint;
  corners: Record<string, unknown>[];
  checks: CheckItem[];
  failed: number;
  warned: number;
  cautions: string[];
  /** mains designs: the single-fault analysis */
  faults?: Record<string, unknown>[];
  switch_on?: Record<string, unknown>;
  /** asked for with waveforms */
  waveform?: Record<string, number[]>;
  unbounded?: string[];
  json_note?: string;
}

export interface StudyAnswer {
  ok: true;
  seed: number;
  samples: number;
  variables: string[];
  box: Record<string, number[]>;
  corners: Record<string, unknown>;
  led_current_A: Record<string, number>;
  stress: Record<string, unknown>;
  histogram: Record<string, unknown>;
  reduced_model: Record<string, unknown>;
  exact_solves: number;
}

export interface SheetAnswer {
  ok: true;
  name: string;
  /** the build sheet, every text from the file escaped by the core */
  html: string;
  failed: number;
}

/** A design file as form values, per table ("" is the top level), and the wire runs: quantities as the text a user types; whole numbers (counts) may come as numbers, and the form sends everything back as text. */
export interface DesignDoc {
  tables: Record<string, Record<string, string | number>>;
  wires: (Record<string, string | number>)[];
}

export interface DesignSchemaRequest {
  kind: "design_schema";
}

export interface DesignKey {
  name: string;
  dim: string;
  required: boolean;
  /** formatted for reading */
  default: string | null;
  example: string;
}

export interface DesignTable {
  name: string;
  /** the supply kinds whose designs have this table */
  kind: "mains" | "cv" | "both";
  keys: DesignKey[];
}

export interface DesignSchemaAnswer {
  ok: true;
  tables: DesignTable[];
  wire: DesignKey[];
  list_separator: string;
  point_separator: string;
}

export interface DesignDocRequest {
  kind: "design_doc";
  toml: string;
}

export interface DesignDocAnswer {
  ok: true;
  doc: DesignDoc;
}

export interface DesignTomlRequest {
  kind: "design_toml";
  doc: DesignDoc;
}

export interface DesignTomlAnswer {
  ok: true;
  toml: string;
}

export interface PlanOptions {
  /** a whole number */
  modules: string;
  /** dropper, cv or suggest */
  supply?: string;
  current_max?: string;
  current_min?: string;
  /** "60 %; 100 %" */
  steps?: string;
}

export interface PlanRequest {
  kind: "plan";
  doc: DesignDoc;
  options: PlanOptions;
}

export interface Proposal {
  supply: string;
  series: number;
  parallel: number;
  ok: boolean;
  figures: Record<string, number>;
  failed: string[];
  failed_why: Record<string, string>;
  warned: string[];
  hazards: string[];
  rejected: string;
}

export interface PlanAnswer {
  /** the request was answered; ``best`` is null when no arrangement passes */
  ok: true;
  name: string;
  modules: number;
  supply: string;
  best: number | null;
  proposals: Proposal[];
  notes: string[];
  /** why nothing passed */
  constraint: string | null;
  cautions: string[];
  /** the best proposal's design file */
  design?: string;
  /** the same as form values */
  doc?: DesignDoc;
}

export type Value = number | string | null;

export type Request = DescribeRequest | ComputeRequest | SweepRequest | CheckRequest | StudyRequest | SheetRequest | DesignSchemaRequest | DesignDocRequest | DesignTomlRequest | PlanRequest;

export type DesignAnswer = CheckAnswer | StudyAnswer | SheetAnswer | DesignSchemaAnswer | DesignDocAnswer | DesignTomlAnswer | PlanAnswer | Refusal;

export type Answer = DescribeAnswer | ComputeAnswer | SweepAnswer | CheckAnswer | StudyAnswer | SheetAnswer | DesignSchemaAnswer | DesignDocAnswer | DesignTomlAnswer | PlanAnswer | Refusal;

/** The answer each request kind gets. */
export interface Answers {
  describe: DescribeAnswer | Refusal;
  compute: ComputeAnswer | Refusal;
  sweep: SweepAnswer | Refusal;
  check: CheckAnswer | Refusal;
  study: StudyAnswer | Refusal;
  sheet: SheetAnswer | Refusal;
  design_schema: DesignSchemaAnswer | Refusal;
  design_doc: DesignDocAnswer | Refusal;
  design_toml: DesignTomlAnswer | Refusal;
  plan: PlanAnswer | Refusal;
}

/** The answer a request gets: its kind's answer, or a refusal naming the problems. */
export type AnswerTo<R extends Request> = R extends { kind: infer K }
  ? K extends keyof Answers ? Answers[K] : Refusal
  : Answers["compute"];
