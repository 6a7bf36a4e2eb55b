"""pandas tables of screening results, for notebooks and scripts (presentation only).

Every table is built from what the other surfaces read (the JSON-ready dict of
:meth:`screen.analyses.engine.ScreeningResult.to_json_dict`, the rows of a sweep, the changes of
a comparison, the Monte Carlo block), with the JSON key names as column names, and carries in
``DataFrame.attrs`` the cautions (``attrs["cautions"]``) and the tool version
(``attrs["tool_version"]``). pandas is imported inside the functions.
"""

from __future__ import annotations

from typing import Any


def with_attrs(frame, **extra):
    """Put the cautions, the tool name and version (and ``extra``) into ``frame.attrs``.

    Parameters
    ----------
    frame : pandas.DataFrame
        Table to label (changed in place and returned).
    **extra
        Further ``attrs`` entries.
    """
    from screen import __version__
    from screen.cautions import CAUTIONS

    frame.attrs["cautions"] = list(CAUTIONS)
    frame.attrs["tool"] = "runaway-screen"
    frame.attrs["tool_version"] = __version__
    frame.attrs.update(extra)
    return frame


def _scalar(value) -> bool:
    return value is None or isinstance(value, (str, int, float, bool))


def scalar_figures(results: dict, prefix: str = "") -> dict[str, Any]:
    """The scalar members of ``results``; members of nested tables as ``"table.key"``.

    Lists (vessels, scenario rows, ...) are left out: they have tables of their own.

    Parameters
    ----------
    results : dict
        The ``results`` table of a JSON-ready result.
    prefix : str
        Key prefix of nested members ('' at the top).
    """
    flat: dict[str, Any] = {}
    for key, value in results.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            flat.update(scalar_figures(value, f"{name}."))
        elif _scalar(value):
            flat[name] = value
    return flat


def result_frame(data: dict):
    """One row of the scalar figures of a screening (columns named as the JSON keys).

    Parameters
    ----------
    data : dict
        :meth:`ScreeningResult.to_json_dict` output.

    Returns
    -------
    pandas.DataFrame
        One row indexed by the case title; ``*_degC`` columns in degC, ``*_K`` in K, ``*_h`` in
        hours, as in the JSON.
    """
    import pandas as pd

    row = scalar_figures(data["results"])
    frame = pd.DataFrame([row], index=pd.Index([data["case"]["title"]], name="case"))
    return with_attrs(frame, case=dict(data["case"]), warnings=list(data["warnings"]))


def vessels_frame(data: dict):
    """One row per vessel (JSON keys of ``results.vessels`` as columns), indexed by the vessel
    name; the barrier verdict of the vessel is added when the case has one.

    Parameters
    ----------
    data : dict
        :meth:`ScreeningResult.to_json_dict` output.
    """
    import pandas as pd

    results = data["results"]
    barrier = {item.get("name"): item for item in
               ((results.get("barrier") or {}).get("vessels") or [])
               if isinstance(item, dict)}
    rows = []
    for entry in results.get("vessels") or []:
        row = scalar_figures(entry)
        verdict = barrier.get(entry.get("name"), {}).get("barrier_verdict")
        if verdict is not None and "barrier_verdict" not in row:
            row["barrier_verdict"] = verdict
        rows.append(row)
    frame = pd.DataFrame(rows)
    if "name" in frame.columns:
        frame = frame.set_index("name")
        frame.index.name = "vessel"
    return with_attrs(frame, case=dict(data["case"]))


def sweep_frame(rows, flips, variations, case):
    """The rows of a sweep: varied inputs in SI and in the display unit, then the figures.

    Parameters
    ----------
    rows, flips : list
        :func:`screen.runs.sweep.run_sweep` output.
    variations : list of screen.runs.sweep.Variation
        The varied inputs.
    case : screen.io.case.Case
        The swept case (title and path go into ``attrs``).

    Returns
    -------
    pandas.DataFrame
        Columns ``KEY [unit]`` for each varied input (SI and display unit), the followed
        figures (JSON names; vessel figures as ``VESSEL:key``), ``warnings`` and ``error`` for
        points whose input was invalid. ``attrs["flips"]``: the verdict changes located by
        bisection, as in ``sweep --json``.
    """
    import pandas as pd

    from screen.runs.sweep import display_rows

    frame = pd.DataFrame(display_rows(rows, variations))
    last = [name for name in ("warnings", "error") if name in frame.columns]
    frame = frame[[c for c in frame.columns if c not in last] + last]
    return with_attrs(frame, case={"title": case.title, "path": case.path,
                                   "sha256": case.sha256},
                      vary=[{"key": v.key, "range": v.text, "unit_si": v.unit}
                            for v in variations],
                      flips=[f.as_record() for f in flips])


def compare_frame(old: dict, new: dict, input_changes, result_changes):
    """The changes between two results, one row each: inputs first, then figures.

    Columns: ``kind`` ("input" or "result"), ``key``, ``old``, ``new``, ``direction``,
    ``delta`` (numbers only) and ``is_verdict``; ``attrs["verdict_changed"]``.

    Parameters
    ----------
    old : dict
        Earlier JSON-ready result.
    new : dict
        Later JSON-ready result.
    input_changes : list of Change
        Changed inputs.
    result_changes : list of Change
        Changed results.
    """
    import pandas as pd

    records = []
    for kind, changes in (("input", input_changes), ("result", result_changes)):
        for change in changes:
            records.append({"kind": kind, "key": change.key, "old": change.old,
                            "new": change.new, "direction": change.direction,
                            "delta": change.delta, "is_verdict": change.is_verdict})
    columns = ["kind", "key", "old", "new", "direction", "delta", "is_verdict"]
    frame = pd.DataFrame(records, columns=columns)
    return with_attrs(frame, old=dict(old["case"]), new=dict(new["case"]),
                      verdict_changed=any(c.is_verdict for c in result_changes))


def class_probabilities_frame(block: dict):
    """Probability of each criticality class from a Monte Carlo block (index: class 1..5).

    Parameters
    ----------
    block : dict
        ``results.uncertainty`` of a Monte Carlo run.
    """
    import pandas as pd

    probabilities = block["class_probabilities"]
    frame = pd.DataFrame({"probability": [probabilities[str(k)] for k in range(1, 6)]},
                         index=pd.Index(range(1, 6), name="criticality_class"))
    return with_attrs(frame, samples=block["samples"], seed=block["seed"])


#: Figures of the Monte Carlo block with percentiles (JSON keys, units in the names).
PERCENTILE_FIGURES = ("mtsr_degC", "td24_degC", "tmrad_at_mtsr_h", "onset_margin_K",
                      "synthesis_adiabatic_rise_K", "decomposition_adiabatic_rise_K")


def percentiles_frame(block: dict):
    """p5, p50, p95, mean and std of each figure of a Monte Carlo block (one row each; vessel
    figures as ``VESSEL:key``).

    Parameters
    ----------
    block : dict
        ``results.uncertainty`` of a Monte Carlo run.
    """
    import pandas as pd

    rows = {}
    for key in PERCENTILE_FIGURES:
        if isinstance(block.get(key), dict):
            rows[key] = block[key]
    for vessel in block.get("vessels") or []:
        for key, value in vessel.items():
            if isinstance(value, dict) and "p50" in value:
                rows[f"{vessel.get('name')}:{key}"] = value
    frame = pd.DataFrame.from_dict(rows, orient="index")
    frame.index.name = "figure"
    return with_attrs(frame, samples=block["samples"], seed=block["seed"])


def sensitivity_frame(block: dict):
    """Spearman rank correlation of each uncertain input with the margin TD24 - MTSR and with
    TMRad at MTSR, largest first (index: the input key).

    Parameters
    ----------
    block : dict
        ``results.uncertainty`` of a Monte Carlo run.
    """
    import pandas as pd

    frame = pd.DataFrame(block.get("sensitivity") or [],
                         columns=["key", "rank_correlation_onset_margin",
                                  "rank_correlation_tmrad_at_mtsr"]).set_index("key")
    return with_attrs(frame, samples=block["samples"], seed=block["seed"])
