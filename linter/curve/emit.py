"""Writing a logic-family YAML from a measured curve, in the format of ``families/*.yaml``.

What a transfer curve shows, and so what is written as *measured* (each value's source names the
CSV file it came from):

- ``vil_max`` and ``vih_min``: the unity-gain points;
- the ``level`` of the one ``vol_max`` point and of the one ``voh_min`` point: the outputs there;
- ``supply``: the supply of the measurement, as nominal, minimum and maximum alike, because one
  sweep says nothing about other supplies.

Each measured level is rounded to 1 mV towards the cautious side (``vil_max`` and ``voh_min``
down, ``vih_min`` and ``vol_max`` up), so the family never promises more than was measured.

What a transfer curve cannot show (input limits, input currents, protection when unpowered, the
output kind and the load the levels hold at) is copied from the family the part is declared as
(``--family``), citing that family's own sources. The emitted text is parsed with the family
loader before it is returned, so a file written from it always loads.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import yaml

from linter.curve.analysis import CurveAnalysis
from linter.electrical.expr import Expression
from linter.electrical.family import LogicFamily, OutputKind
from linter.electrical.family_loader import parse_family
from linter.errors import InputError, UsageError
from linter.yamlio import load_yaml_text

_NAME_CHARACTER = re.compile(r"[^A-Za-z0-9_.-]")
MEASURED = "measured on one sample, not a rated limit"


def family_name_for(output: str | Path) -> str:
    """A family name from the output file's name: ``parts/u7-measured.yaml`` -> ``u7-measured``."""
    stem = _NAME_CHARACTER.sub("-", Path(output).stem).strip("-._") or "measured"
    return stem if stem[0].isalnum() else f"m{stem}"


def cannot_emit_reason(analysis: CurveAnalysis) -> str | None:
    """Why no family can be written (the curve breaks the static discipline), or None."""
    if analysis.vil_max is None:
        return "the curve has no unity-gain points"
    if analysis.findings:
        return "the measured levels break the static discipline"
    return None


def _floor_mv(volts: float) -> float:
    return math.floor(round(volts * 1000.0, 6)) / 1000.0


def _ceil_mv(volts: float) -> float:
    return math.ceil(round(volts * 1000.0, 6)) / 1000.0


def _level(expression: Expression) -> float | str:
    return expression.text if expression.uses_supply else expression.evaluate()


def _measured_source(csv_name: str, what: str) -> str:
    return f"measured from '{csv_name}' ({what}); {MEASURED}"


def _copied_source(base: LogicFamily, key: str) -> str:
    source = base.sources.get(key)
    return f"copied from family '{base.name}': {source.text if source else 'no source given'}"


def measured_family_yaml(
    analysis: CurveAnalysis, base: LogicFamily, supply: float, supply_given: bool, name: str
) -> str:
    """The YAML text of a family holding the measured levels of ``analysis`` at ``supply`` volts.

    ``base`` supplies what the curve cannot show; ``supply_given`` says whether the supply was
    stated for the measurement (``--supply``) or taken from ``base``'s nominal.
    """
    reason = cannot_emit_reason(analysis)
    if reason is not None:
        raise UsageError(f"cannot write a family from '{analysis.source}': {reason}")
    assert analysis.vil_max is not None and analysis.vih_min is not None
    assert analysis.voh_min is not None and analysis.vol_max is not None
    csv_name = analysis.source
    inverting = analysis.inverting
    vol_input = "upper" if inverting else "lower"
    voh_input = "lower" if inverting else "upper"
    supply_text = (
        f"the supply stated for the measurement of '{csv_name}' (--supply {supply:g} V); {MEASURED}"
        if supply_given
        else f"the measurement of '{csv_name}' is taken to be at the nominal {supply:g} V of family "
        f"'{base.name}' (no --supply given); {MEASURED}"
    )
    sink_a = base.lightest_sink_a()
    open_drain = base.output_kind is OutputKind.OPEN_DRAIN
    load_note = f"load current copied from the lightest rated point of family '{base.name}' (the CSV has no load)"
    data = {
        "name": name,
        "title": f"Measured {analysis.polarity} stage from '{Path(csv_name).name}' at {supply:g} V",
        "supply": {"nominal": supply, "minimum": supply, "maximum": supply},
        "vil_max": _floor_mv(analysis.vil_max),
        "vih_min": _ceil_mv(analysis.vih_min),
        "input_min": _level(base.input_min),
        "input_max": _level(base.input_max),
        "inputs_protected_unpowered": base.inputs_protected_unpowered,
        "iil": base.iil,
        "iih": base.iih,
        "output_kind": base.output_kind.value,
        "vol_max": [{"current": sink_a, "level": _ceil_mv(analysis.vol_max)}],
        "voh_min": [] if open_drain else [
            {"current": -base.lightest_source_a(), "level": _floor_mv(analysis.voh_min)}
        ],
        "notes": (
            f"Measured by levelcross curve from '{csv_name}': one sample at one supply. Levels are the "
            "unity-gain points of the fitted transfer curve and the outputs there, rounded 1 mV towards "
            f"the cautious side; they are not rated limits. Fields a transfer curve cannot show were "
            f"copied from family '{base.name}'."
        ),
        "sources": {
            "supply": supply_text,
            "vil_max": _measured_source(csv_name, "lower unity-gain point, rounded down to 1 mV"),
            "vih_min": _measured_source(csv_name, "upper unity-gain point, rounded up to 1 mV"),
            "input_min": _copied_source(base, "input_min"),
            "input_max": _copied_source(base, "input_max"),
            "inputs_protected_unpowered": _copied_source(base, "inputs_protected_unpowered"),
            "iil": _copied_source(base, "iil"),
            "iih": _copied_source(base, "iih"),
            "output_kind": _copied_source(base, "output_kind"),
            "vol_max": _measured_source(
                csv_name, f"output at the {vol_input} unity-gain point, rounded up to 1 mV; {load_note}"
            ),
            "voh_min": (
                _copied_source(base, "voh_min") if open_drain else _measured_source(
                    csv_name, f"output at the {voh_input} unity-gain point, rounded down to 1 mV; {load_note}"
                )
            ),
        },
    }
    header = (
        f"# MEASURED family written by 'levelcross curve' from {csv_name}.\n"
        "# One sample at one supply: check it against the part's datasheet before relying on it.\n"
    )
    text = header + yaml.safe_dump(data, sort_keys=False, allow_unicode=True, width=100)
    try:
        parse_family(load_yaml_text(text, name), name, text.splitlines())
    except InputError as error:
        raise UsageError(f"cannot write a family from '{csv_name}': {error.message}") from None
    return text
