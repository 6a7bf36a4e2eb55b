"""``runaway-screen compare`` and ``runaway-screen sweep``: reruns after a change."""

from __future__ import annotations

import json

import click

from screen.io.result_json import MAX_RESULT_BYTES, read_result_json  # noqa: F401  (re-export)


def _load_any(path, overrides=()):
    """A JSON-ready result dict from a case file (.toml) or an earlier ``--json`` output."""
    from screen.cli.common import run_check, timestamp

    if str(path).lower().endswith(".json"):
        return read_result_json(path)
    return run_check(path, overrides).to_json_dict(generated_at=timestamp())


def _label(key: str) -> tuple[str, str]:
    """(group, name) of a flattened result key: ``vessels[R-1].ua_W_per_K`` -> (``R-1``,
    ``ua``); ``simulation.mtsr_feed_stopped_degC`` -> (``simulation``, ``mtsr_feed_stopped``)."""
    import re

    from screen.runs.compare import split_unit

    bare, _ = split_unit(key)
    match = re.match(r"^(?:(\w+)\.)?vessels\[(.+?)\]\.(.+)$", bare)
    if match:
        block, name, rest = match.groups()
        return (f"{block}: {name}" if block else name), rest.replace("_", " ")
    if "." in bare:
        group, rest = bare.rsplit(".", 1)
        return group, rest.replace("_", " ")
    return "", bare.replace("_", " ")


def format_comparison(old, new, input_changes, result_changes) -> str:
    """Plain-text comparison of two results: verdict changes first, then the inputs that
    differ, then a table of the figures (before, after, change, with units); differences below
    the printed precision are left out; warnings the new result adds; the cautions.

    Parameters
    ----------
    old : dict
        Earlier JSON-ready result.
    new : dict
        Later JSON-ready result.
    input_changes : list of Change
        Changed inputs (:func:`screen.runs.compare.diff_inputs`).
    result_changes : list of Change
        Changed results (:func:`screen.runs.compare.diff_dicts`).
    """
    from screen.report.terminal import caution_head, caution_lines
    from screen.runs.compare import printed, shows_a_difference, split_unit

    lines = [f"Comparison: {old['case']['path']}  ->  {new['case']['path']}", *caution_head()]
    for text in new.get("overrides") or []:
        if text not in (old.get("overrides") or []):
            lines.append(f"what-if    --set {text}")
    lines.append("")
    verdicts = [c for c in result_changes if c.is_verdict]
    if verdicts:
        lines.append(f"VERDICT CHANGED ({len(verdicts)})")
        for c in verdicts:
            group, name = _label(c.key)
            label = f"{group}: {name}" if group else name
            lines.append(f"  {label[:46]:<46} {_cell(c.old, ''):>12}  ->  {_cell(c.new, '')}")
    else:
        lines.append("No verdict changed (class, severity, probability, per-vessel verdicts, "
                     "barrier).")
    lines.append("")
    lines.append(f"Inputs that differ ({len(input_changes)})")
    for c in input_changes:
        lines.append(f"  {c.key}: {printed(c.old)}  ->  {printed(c.new)}")
    lines.append("")
    others = [c for c in result_changes if not c.is_verdict]
    shown = [c for c in others if shows_a_difference(c)]
    hidden = len(others) - len(shown)
    lines.append(f"Figures that changed ({len(shown)}"
                 + (f"; {hidden} more below the printed precision, see --json" if hidden else "")
                 + ")")
    if shown:
        lines.append(f"  {'figure':<36}{'unit':<8}{'before':>11}{'after':>11}{'change':>10}")
    group_shown = None
    for c in shown:
        group, name = _label(c.key)
        if group != group_shown:
            if group:
                lines.append(f"  {group}")
            group_shown = group
        unit = split_unit(c.key)[1]
        delta = c.delta
        change = ("" if delta is None else
                  printed(delta, "K" if unit == "degC" else unit) if delta < 0 else
                  "+" + printed(delta, "K" if unit == "degC" else unit))
        if delta is None:
            change = {"added": "added", "removed": "removed"}.get(c.direction, "changed")
        indent = "    " if group else "  "
        width = 38 - len(indent)
        name = name if len(name) < width else name[:width - 2] + "~"
        before, after = _cell(c.old, unit), _cell(c.new, unit)
        lines.append(f"{indent}{name:<{width}}{unit:<8}{before:>11}{after:>11}{change:>11}")
    added = _new_warnings(old, new)
    if added:
        from screen.report.terminal import WIDTH, textwrap

        lines += ["", f"New warnings ({len(added)})"]
        for text in added:
            lines.append(textwrap.fill(text, WIDTH, initial_indent="  - ",
                                       subsequent_indent="    "))
    lines += [""] + caution_lines()
    return "\n".join(lines)


def _cell(value, unit) -> str:
    """A table cell: the printed figure; a sentence is only named (it is in --json)."""
    from screen.runs.compare import printed

    text = printed(value, unit)
    return "(text)" if isinstance(value, str) and len(text) > 24 else text


def _new_warnings(old_data, new_data) -> list[str]:
    """Warnings of the new result that the old one did not raise (a what-if may need them)."""
    before = set(old_data.get("warnings") or [])
    return [w for w in new_data.get("warnings") or [] if w not in before]


@click.command("compare")
@click.argument("old", type=click.Path(dir_okay=False))
@click.argument("new", type=click.Path(dir_okay=False), required=False)
@click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
              help="What-if override applied to NEW (or, without NEW, to OLD: the case against "
                   "its own what-if), e.g. --set 'synthesis.dosing_time=8 h'. Repeatable.")
@click.option("--json", "as_json", is_flag=True, help="Print the differences as JSON.")
@click.option("--fail-on-verdict-change", is_flag=True,
              help="Exit with status 1 when a verdict changed (for scripted reviews).")
def compare_command(old, new, overrides, as_json, fail_on_verdict_change):
    """Compare two case files (or a case and an earlier --json result), or a case with its own
    what-if (--set): verdict changes first, then the figures that changed.

    \f

    Parameters
    ----------
    old : str
        OLD argument: case file or earlier ``check --json`` output.
    new : str or None
        NEW argument: case file or ``check --json`` output; None compares OLD with its own
        what-if (``--set``).
    overrides : tuple of str
        ``--set KEY=VALUE`` what-if overrides applied to NEW (or to OLD without NEW).
    as_json : bool
        ``--json``: print the differences as JSON.
    fail_on_verdict_change : bool
        ``--fail-on-verdict-change``: exit with status 1 when a verdict changed.
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        from screen.cautions import CAUTIONS
        from screen.errors import CaseError
        from screen.runs.compare import diff_results, shows_a_difference

        target = new if new is not None else old
        if new is None and not overrides:
            raise CaseError("give NEW (a case file or a --json result) or --set KEY=VALUE to "
                            "compare the case with its own what-if", "compare")
        if overrides and str(target).lower().endswith(".json"):
            raise CaseError("--set needs a case file (.toml), not an earlier --json result",
                            "--set", str(target))
        old_data, new_data = _load_any(old), _load_any(target, overrides)
        input_changes, result_changes = diff_results(old_data, new_data)
        if as_json:
            payload = {
                "old": old_data["case"], "new": new_data["case"],
                "overrides": list(overrides),
                "verdict_changed": any(c.is_verdict for c in result_changes),
                "input_changes": [c.__dict__ for c in input_changes],
                "result_changes": [dict(c.__dict__, delta=c.delta,
                                        shown=c.is_verdict or shows_a_difference(c))
                                   for c in result_changes],
                "warnings": new_data.get("warnings", []),
                "cautions": list(CAUTIONS),
            }
            click.echo(json.dumps(payload, indent=2, ensure_ascii=False, default=str))
        else:
            click.echo(format_comparison(old_data, new_data, input_changes, result_changes))
        if fail_on_verdict_change and any(c.is_verdict for c in result_changes):
            raise SystemExit(1)

    run()


@click.command("sweep")
@click.argument("case_file", type=click.Path(dir_okay=False))
@click.option("--vary", "vary", multiple=True, required=True, metavar="KEY=START:STOP:STEPS",
              help="Input to vary, e.g. 'vessel.coolant_temperature=0 degC:40 degC:41'. "
                   "Once or twice.")
@click.option("--set", "overrides", multiple=True, metavar="KEY=VALUE",
              help="Fixed what-if override applied before the sweep.")
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False), default=None,
              help="Also write the table as CSV.")
@click.option("--force", is_flag=True, help="Overwrite an existing CSV file.")
@click.option("--json", "as_json", is_flag=True, help="Print rows and flips as JSON.")
def sweep_command(case_file, vary, overrides, csv_path, force, as_json):
    """Run CASE_FILE over a range of one or two inputs; report where verdicts flip.

    \f

    Parameters
    ----------
    case_file : str
        CASE_FILE argument: the TOML case file.
    vary : tuple of str
        ``--vary KEY=START:STOP:STEPS`` (once or twice; START and STOP with units).
    overrides : tuple of str
        ``--set KEY=VALUE`` fixed what-if overrides.
    csv_path : str or None
        ``--csv``: also write the table as CSV.
    force : bool
        ``--force``: overwrite an existing CSV file.
    as_json : bool
        ``--json``: print rows and flips as JSON.
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        from screen.cautions import CAUTIONS
        from screen.errors import ScreenError
        from screen.io.case import load_case
        from screen.runs.sweep import parse_vary, run_sweep, to_display

        case = load_case(case_file, overrides=overrides)
        try:
            variations = [parse_vary(v, case) for v in vary]
        except ScreenError as exc:  # a bad --vary concerns the command line, for this case
            raise type(exc)(exc.message, exc.key if exc.key == "--vary" else
                            f"--vary {exc.key}" if exc.key else "--vary",
                            exc.path or str(case_file)) from None
        if csv_path:
            from screen.io.fileio import check_writable

            check_writable(csv_path, force, [case_file])  # fail before the computation
        from screen.progress import ProgressBar

        total = 1
        for variation in variations:
            total *= len(variation.values)
        with ProgressBar(total, "Sweep", enabled=not as_json, unit="points") as bar:
            rows, flips = run_sweep(case, variations, progress=bar)
        if csv_path:
            _write_csv(rows, csv_path, force, variations, inputs=[case_file])
        if as_json:
            payload = {
                "case": {"title": case.title, "path": case.path, "sha256": case.sha256},
                "vary": [{"key": v.key, "range": v.text, "unit_si": v.unit} for v in variations],
                "rows": rows,
                "flips": [f.as_record() for f in flips],
                "cautions": list(CAUTIONS),
            }
            click.echo(json.dumps(payload, indent=2, ensure_ascii=False, default=str))
            return
        from screen.report.terminal import caution_lines

        click.echo(_format_sweep(case, variations, rows, flips, to_display))
        if csv_path:
            click.echo(f"\nCSV written to {csv_path} (first line: the cautions, as a # comment)")
        click.echo("\n" + "\n".join(caution_lines()))

    run()


def _format_sweep(case, variations, rows, flips, to_display):
    first = variations[0]
    from screen.report.terminal import caution_head

    lines = [f"Sweep of {case.title}", *caution_head(), f"  {first.key} over {first.text}"]
    if len(variations) > 1:
        lines.append(f"  {variations[1].key} over {variations[1].text}")
    lines.append("")
    figure_keys = ["mtsr_degC", "td24_degC", "tmrad_at_mtsr_h", "criticality_class"]
    vessel_keys = [k for k in rows[0] if k.endswith(":stability")] if rows else []
    head = [first.key.split(".")[-1]] + (["" + variations[1].key.split(".")[-1]]
                                         if len(variations) > 1 else [])
    header = "  ".join(f"{h[:14]:>14}" for h in head + ["MTSR degC", "TD24 degC", "TMRad h",
                                                          "class"])
    header += "".join(f"  {k.split(':')[0][:18]:>18}" for k in vessel_keys)
    lines.append(header)
    for row in rows:
        cells = [to_display(row[first.key], first.unit, first.kind)[0]]
        if len(variations) > 1:
            cells.append(to_display(row[variations[1].key], variations[1].unit,
                                    variations[1].kind)[0])
        text = "  ".join(f"{c:14.4g}" for c in cells)
        if "error" in row:
            text += f"  input error: {row['error'][:60]}"
        else:
            for key in figure_keys:
                value = row.get(key)
                text += f"  {value:14.4g}" if isinstance(value, (int, float)) else f"  {'-':>14}"
            for key in vessel_keys:
                text += f"  {str(row.get(key))[:18]:>18}"
        lines.append(text)
    lines.append("")
    if flips:
        lines.append("Verdict flips (located by bisection):")
        for flip in flips:
            value, unit = to_display(flip.value, first.unit, first.kind)
            fixed = ""
            if flip.fixed:
                k, v = flip.fixed[0]
                dv, du = to_display(v, variations[1].unit, variations[1].kind)
                fixed = f" (at {k.split('.')[-1]} = {dv:.4g} {du})"
            changes = "; ".join(
                f"{n}: {'not assessed' if a is None else a} -> {'not assessed' if b is None else b}"
                for n, a, b in flip.changed())
            lines.append(f"  !!! {first.key} = {value:.6g} {unit}{fixed}: {changes}")
    else:
        lines.append("No verdict flips over this range.")
    return "\n".join(lines)


def _write_csv(rows, path, force, variations=(), inputs=()):
    import csv
    import io

    from screen.io.fileio import write_atomic
    from screen.runs.sweep import display_rows

    rows = display_rows(rows, variations)
    keys: list[str] = []
    for row in rows:
        for key in row:
            if key not in keys:
                keys.append(key)
    from screen.cautions import csv_comment

    buffer = io.StringIO()
    buffer.write(csv_comment())
    # Text cells quoted, so that a '#' in a name never reads as a comment (pandas comment="#").
    writer = csv.DictWriter(buffer, fieldnames=keys, lineterminator="\n",
                            quoting=csv.QUOTE_NONNUMERIC)
    writer.writeheader()
    for row in rows:
        writer.writerow(row)
    write_atomic(path, buffer.getvalue().encode("utf-8"), force=force, inputs=inputs)
