"""The page protocol: every request :func:`lampcalc.api.handle` reads and every
answer it writes, declared once as ``TypedDict``s.

Import rule: standard library ``typing`` only (no other part of the core), so
every layer may name these shapes. The handlers in ``api.py``, ``design_api.py``
and ``schema.py`` are annotated with them; ``lampbook/protocoltypes.py`` writes
them out as TypeScript declarations (``lampbook/assets/protocol.d.ts``) that the
page scripts are type-checked against, so Python stays the one source.

Numbers are SI floats (JSON numbers); an unbounded or undefined number arrives
as ``null`` and its path is listed under ``unbounded``. Every numeric key names
its unit at its end (``ripple_pp_V``, ``led_current_avg_A``, ``area_m2``,
``resistance_ohm_per_m``, ``theta_ja_K_per_W``); quantities the trade states in
percent end with ``_pct`` and are 0-100 (``percent_flicker_pct``); a key with no
unit is a dimensionless fraction (0-1) or a count (README, "Numbers in the JSON";
``tests/test_protocol.py`` walks every answer for it). Fields marked
``NotRequired`` may be absent. Where the review's answer nests parts that only
some designs have (faults, emissions, light, camera), the declaration names the
field and leaves its inside as ``object`` (``unknown`` in TypeScript): the page
reads those parts only through the sheet the core renders.

This module is written without ``from __future__ import annotations`` on
purpose: the generator resolves ``NotRequired`` and ``Literal`` at run time.
"""

from typing import Any, Literal, NotRequired, TypedDict

#: a calculator's output or input after parsing: an SI number, a text, or nothing
Value = float | str | None


# --- shared ---------------------------------------------------------------------------------------------------


class ErrorItem(TypedDict):
    """One problem with the input: the field, the value given, what was expected."""

    field: str
    value: str
    expected: str
    message: str


class Refusal(TypedDict):
    """The answer to any request the core cannot answer: every problem found."""

    ok: Literal[False]
    errors: list[ErrorItem]
    calculator: NotRequired[str]  # a compute request's calculator


# --- describe: the calculators' declarations --------------------------------------------------------------------


class DescribeRequest(TypedDict):
    kind: Literal["describe"]


class ParamDecl(TypedDict):
    name: str
    label: str
    dim: str  # a units dimension, "choice", "region" or "text"
    default: str | None  # as typed; null: optional, absent unless given
    imperial: str | None
    help: str
    choices: list[str]
    modes: list[str]
    minimum: float | None  # SI
    maximum: float | None  # SI
    secondary: bool


class OutputDecl(TypedDict):
    name: str
    label: str
    dim: str
    help: str
    modes: list[str]


class ColumnDecl(TypedDict):
    name: str
    label: str
    dim: str


class SweepDecl(TypedDict):
    """A plot the page may draw: one output against one input swept about its value."""

    name: str
    param: str  # the input swept
    output: str  # the output drawn
    label: str  # the figure's caption
    x_title: str
    y_title: str
    x_unit: str  # SI symbol of the input
    y_unit: str  # SI symbol of the output
    low: float  # the sweep runs from low to high times the input's value
    high: float
    log: bool  # factors spaced evenly on a log scale (and a log axis)
    points: int


class CalculatorDecl(TypedDict):
    name: str
    title: str
    summary: str
    mains: bool
    mains_modes: list[str]
    mode: str | None
    params: list[ParamDecl]
    outputs: list[OutputDecl]
    columns: list[ColumnDecl]
    plots: list[SweepDecl]
    main: list[str]


class CalculatorBlock(TypedDict):
    """What a calculator block in a page carries as JSON beside its form: the
    declaration the page builds it from and the answer computed at build time
    (shown until the engine answers)."""

    id: str  # the block's element id, lb-<calculator>-<n>
    calculator: str
    declaration: CalculatorDecl
    answer: "ComputeAnswer"


class RegionPreset(TypedDict):
    voltage: str
    frequency: str
    tolerance: str
    label: str
    source: str


class DescribeAnswer(TypedDict):
    ok: Literal[True]
    calculators: list[CalculatorDecl]
    regions: dict[str, RegionPreset]


# --- compute and sweep: one calculator ------------------------------------------------------------------------


class ComputeRequest(TypedDict):
    kind: NotRequired[Literal["compute"]]  # the default kind
    calculator: str
    inputs: dict[str, str]  # as typed, by input name; a blank is an error for an input with a usual value


class ComputeAnswer(TypedDict):
    calculator: str
    ok: Literal[True]
    values: dict[str, Value]  # SI, by output name
    display: dict[str, str]  # the same values formatted for reading
    rows: list[dict[str, Value]]  # the table of options
    rows_display: list[dict[str, str]]
    # the page's requests (lampcalc.api.handle): the table of options as the page shows it, rendered by the
    # core's table renderer (lampcalc.present.html); "" when there is none
    rows_html: NotRequired[str]
    applies: list[str]  # the outputs this answer's mode includes
    notes: list[str]
    warnings: list[str]
    cautions: list[str]
    unbounded: NotRequired[list[str]]  # paths of numbers given as null
    json_note: NotRequired[str]


class SweepRequest(TypedDict):
    kind: Literal["sweep"]
    calculator: str
    plot: str  # a SweepDecl name of the calculator
    inputs: dict[str, str]


class SweepAnswer(TypedDict):
    ok: Literal[True]
    calculator: str
    plot: str
    centre: float  # the swept input's value as given (SI)
    points: list[tuple[float, float]]  # (input, output) in SI, the points that have an answer


# --- design files: review, study, build sheet -----------------------------------------------------------------


class CheckRequest(TypedDict):
    kind: Literal["check"]
    toml: str  # the design file's text
    waveforms: NotRequired[bool]


class StudyRequest(TypedDict):
    kind: Literal["study"]
    toml: str
    samples: NotRequired[int]
    seed: NotRequired[int]


class SheetRequest(TypedDict):
    kind: Literal["sheet"]
    toml: str


class OperatingPoint(TypedDict):
    """The figures every corner of a review has; a mains design's corners add the
    bus, ripple, flicker, part stresses and mains quality (``check --json``)."""

    led_current_avg_A: float
    string_current_avg_A: float
    input_power_W: float
    led_power_W: float
    power_factor: NotRequired[float]  # mains designs (a fraction)
    percent_flicker_pct: NotRequired[float]  # mains designs, 0-100


class CheckItem(TypedDict):
    id: str
    status: Literal["pass", "warn", "fail"]
    message: str
    why: str
    source: str
    values: dict[str, float | str]
    corner: NotRequired[dict[str, str]]
    would_pass: NotRequired[str]


class CheckAnswer(TypedDict):
    ok: Literal[True]
    name: str
    revision: str
    date: str
    description: str
    kind: Literal["mains", "cv"]
    nominal: OperatingPoint
    low: OperatingPoint
    high: OperatingPoint
    worst_high: OperatingPoint
    worst_low: NotRequired[OperatingPoint]  # constant-voltage designs
    corners: list[dict[str, Any]]
    checks: list[CheckItem]
    failed: int
    warned: int
    cautions: list[str]
    faults: NotRequired[list[dict[str, Any]]]  # mains designs: the single-fault analysis
    switch_on: NotRequired[dict[str, Any]]
    waveform: NotRequired[dict[str, list[float]]]  # asked for with waveforms
    unbounded: NotRequired[list[str]]
    json_note: NotRequired[str]


class StudyAnswer(TypedDict):
    ok: Literal[True]
    seed: int
    samples: int
    variables: list[str]
    box: dict[str, list[float]]
    corners: dict[str, Any]
    led_current_A: dict[str, float]
    stress: dict[str, Any]
    histogram: dict[str, Any]
    reduced_model: dict[str, Any]
    exact_solves: int


class SheetAnswer(TypedDict):
    ok: Literal[True]
    name: str
    html: str  # the build sheet, every text from the file escaped by the core
    failed: int


# --- the design workbench -------------------------------------------------------------------------------------


class DesignDoc(TypedDict):
    """A design file as form values, per table ("" is the top level), and the wire runs: quantities as the text
    a user types; whole numbers (counts) may come as numbers, and the form sends everything back as text."""

    tables: dict[str, dict[str, str | float]]
    wires: list[dict[str, str | float]]


class DesignSchemaRequest(TypedDict):
    kind: Literal["design_schema"]


class DesignKey(TypedDict):
    name: str
    dim: str
    required: bool
    default: str | None  # formatted for reading
    example: str


class DesignTable(TypedDict):
    name: str
    kind: Literal["mains", "cv", "both"]  # the supply kinds whose designs have this table
    keys: list[DesignKey]


class DesignSchemaAnswer(TypedDict):
    ok: Literal[True]
    tables: list[DesignTable]
    wire: list[DesignKey]
    list_separator: str
    point_separator: str


class DesignDocRequest(TypedDict):
    kind: Literal["design_doc"]
    toml: str


class DesignDocAnswer(TypedDict):
    ok: Literal[True]
    doc: DesignDoc


class DesignTomlRequest(TypedDict):
    kind: Literal["design_toml"]
    doc: DesignDoc


class DesignTomlAnswer(TypedDict):
    ok: Literal[True]
    toml: str


class PlanOptions(TypedDict):
    modules: str  # a whole number
    supply: NotRequired[str]  # dropper, cv or suggest
    current_max: NotRequired[str]
    current_min: NotRequired[str]
    steps: NotRequired[str]  # "60 %; 100 %"


class PlanRequest(TypedDict):
    kind: Literal["plan"]
    doc: DesignDoc
    options: PlanOptions


class Proposal(TypedDict):
    supply: str
    series: int
    parallel: int
    ok: bool
    figures: dict[str, float]
    failed: list[str]
    failed_why: dict[str, str]
    warned: list[str]
    hazards: list[str]
    rejected: str


class PlanAnswer(TypedDict):
    ok: Literal[True]  # the request was answered; ``best`` is null when no arrangement passes
    name: str
    modules: int
    supply: str
    best: int | None
    proposals: list[Proposal]
    notes: list[str]
    constraint: str | None  # why nothing passed
    cautions: list[str]
    design: NotRequired[str]  # the best proposal's design file
    doc: NotRequired[DesignDoc]  # the same as form values


# --- the entry point --------------------------------------------------------------------------------------------

Request = (
    DescribeRequest
    | ComputeRequest
    | SweepRequest
    | CheckRequest
    | StudyRequest
    | SheetRequest
    | DesignSchemaRequest
    | DesignDocRequest
    | DesignTomlRequest
    | PlanRequest
)

#: every answer of the design kinds (lampcalc.design_api.handle)
DesignAnswer = (
    CheckAnswer
    | StudyAnswer
    | SheetAnswer
    | DesignSchemaAnswer
    | DesignDocAnswer
    | DesignTomlAnswer
    | PlanAnswer
    | Refusal
)

Answer = DescribeAnswer | ComputeAnswer | SweepAnswer | DesignAnswer

#: which answer each request kind gets (besides a Refusal)
ANSWERS: dict[str, tuple[type, type]] = {
    "describe": (DescribeRequest, DescribeAnswer),
    "compute": (ComputeRequest, ComputeAnswer),
    "sweep": (SweepRequest, SweepAnswer),
    "check": (CheckRequest, CheckAnswer),
    "study": (StudyRequest, StudyAnswer),
    "sheet": (SheetRequest, SheetAnswer),
    "design_schema": (DesignSchemaRequest, DesignSchemaAnswer),
    "design_doc": (DesignDocRequest, DesignDocAnswer),
    "design_toml": (DesignTomlRequest, DesignTomlAnswer),
    "plan": (PlanRequest, PlanAnswer),
}
