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


def _fmt(value):
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return f"{value:.4g}"
    if isinstance(value, (tuple, list)):
        return f"[{len(value)} items]"
    return str(value)


_ARROWS = {"up": "increased", "down": "decreased", "changed": "changed", "added": "added",
           "removed": "removed"}


def format_comparison(old, new, input_changes, result_changes) -> str:
    """Plain-text comparison of two results, verdict changes first.

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
    lines = [f"Comparison: {old['case']['path']}  ->  {new['case']['path']}", ""]
    verdicts = [c for c in result_changes if c.is_verdict]
    if verdicts:
        lines.append("!!! VERDICT CHANGED !!!")
        for c in verdicts:
            lines.append(f"  !!! {c.key}: {_fmt(c.old)}  ->  {_fmt(c.new)}")
    else:
        lines.append("No verdict changed (class, severity, probability, vessel stability).")
    lines.append("")
    lines.append(f"Inputs that differ ({len(input_changes)})")
    for c in input_changes:
        lines.append(f"  {c.key:<42} {_fmt(c.old):>16}  ->  {_fmt(c.new):<16} "
                     f"{_ARROWS[c.direction]}")
    lines.append("")
    others = [c for c in result_changes if not c.is_verdict]
    lines.append(f"Figures that changed ({len(others)})")
    for c in others:
        delta = c.delta
        extra = f"  ({delta:+.4g})" if delta is not None else ""
        lines.append(f"  {c.key:<52} {_fmt(c.old):>10} -> {_fmt(c.new):<10} "
                     f"{_ARROWS[c.direction]}{extra}")
    from screen.cautions import SHORT_CAUTION

    lines += ["", SHORT_CAUTION]
    return "\n".join(lines)


@click.command("compare")
@click.argument("old", type=click.Path(dir_okay=False))
@click.argument("new", type=click.Path(dir_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print the differences as JSON.")
@click.option("--fail-on-verdict-change", is_flag=True,
              help="Exit with status 1 when a verdict changed (for scripted reviews).")
def compare_command(old, new, as_json, fail_on_verdict_change):
    """Compare two case files (or a case and an earlier --json result): what changed.

    \f

    Parameters
    ----------
    old : str
        OLD argument: case file or earlier ``check --json`` output.
    new : str
        NEW argument: case file or ``check --json`` output.
    as_json : bool
        ``--json``: print the differences as JSON.
    fail_on_verdict_change : bool
        ``--fail-on-verdict-change``: exit with status 1 when a verdict changed.
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        from screen.cautions import CAUTIONS
        from screen.runs.compare import diff_results

        old_data, new_data = _load_any(old), _load_any(new)
        input_changes, result_changes = diff_results(old_data, new_data)
        if as_json:
            payload = {
                "old": old_data["case"], "new": new_data["case"],
                "verdict_changed": any(c.is_verdict for c in result_changes),
                "input_changes": [c.__dict__ for c in input_changes],
                "result_changes": [dict(c.__dict__, delta=c.delta) for c in result_changes],
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
        from screen.cautions import CAUTIONS, SHORT_CAUTION
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
        click.echo(_format_sweep(case, variations, rows, flips, to_display))
        if csv_path:
            click.echo(f"\nCSV written to {csv_path}")
        click.echo("\n" + SHORT_CAUTION)

    run()


def _format_sweep(case, variations, rows, flips, to_display):
    first = variations[0]
    lines = [f"Sweep of {case.title}", f"  {first.key} over {first.text}"]
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
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=keys, lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow(row)
    write_atomic(path, buffer.getvalue().encode("utf-8"), force=force, inputs=inputs)
