"""Benchmarks of runaway-screen, measured side by side in one run (not a pytest module).

Run from the project root:

    python tests/benchmark.py            # full run (about a minute or two)
    python tests/benchmark.py --quick    # fewer repetitions and samples

It measures

1. the command line: ``check --json`` on one case against the bare import time of its heavy
   dependencies (``python -c "import numpy, scipy.integrate, scipy.optimize, pint"``),
   ``runaway-screen --help``, a 200-point ``sweep`` and a ``report`` (PDF);
2. the Monte Carlo: samples per second of the vectorised propagation (every figure: MTSR,
   TD24, TMRad, class, vessel critical point) against a naive loop that calls scipy's
   ``solve_ivp`` once per sample for TMRad at MTSR only;
3. ``limits`` against ``check`` on the same case, CPU time side by side (three vessels;
   synthesis kinetics);
4. the portfolio: cases per second of ``screen_portfolio`` on 1 and 2 worker processes.

Wall-clock times are medians of repeated runs. The machine's load average is printed: on a
shared machine other processes slow everything down, and parallel speed-up needs idle cores.
The output is a Markdown table for docs/benchmarks.md.
"""

from __future__ import annotations

import argparse
import math
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
CASE = os.path.join(ROOT, "cases", "esterification_batch.toml")
UNCERTAIN_CASE = os.path.join(ROOT, "cases", "esterification_uncertain.toml")
CLI = [sys.executable, "-m", "screen"]


def wall(command, repeat):
    """Median wall time [s] of a subprocess command (output discarded)."""
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        completed = subprocess.run(command, cwd=ROOT, stdout=subprocess.DEVNULL,
                                   stderr=subprocess.PIPE, text=True)
        times.append(time.perf_counter() - start)
        if completed.returncode != 0:
            message = " ".join(completed.stderr.split())[-160:]
            print(f"(failed: {' '.join(command[2:])}: {message})", file=sys.stderr)
            return None
    return statistics.median(times)


def cpu(command, repeat):
    """Median CPU time (user + system of the child process) [s] of a subprocess command."""
    import resource

    times = []
    for _ in range(repeat):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        completed = subprocess.run(command, cwd=ROOT, stdout=subprocess.DEVNULL,
                                   stderr=subprocess.PIPE, text=True)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        if completed.returncode != 0:
            print(f"(failed: {' '.join(command[2:])})", file=sys.stderr)
            return None
        times.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return statistics.median(times)


def limits_rows(repeat, quick=False):
    """``limits`` (every default limit) against one ``check`` of the same case, CPU time
    measured side by side: a case with three vessels and no synthesis kinetics, and (not with
    --quick) a case with synthesis kinetics (a simulation at every screening)."""
    rows = []
    cases = [("nitration_semibatch.toml", "3 vessels, no synthesis kinetics")]
    if not quick:
        cases.append(("acylation_semibatch_kinetics.toml", "synthesis kinetics"))
    for name, what in cases:
        path = os.path.join(ROOT, "cases", name)
        check = cpu(CLI + ["check", path, "--json"], repeat)
        limits = cpu(CLI + ["limits", path, "--json"], 1 if "kinetics" in name else repeat)
        rows.append((f"CPU: check --json ({what})", check, ""))
        note = "" if None in (check, limits) else f"{limits / check:.2f} x check (CPU)"
        rows.append((f"CPU: limits --json ({what})", limits, note))
    return rows


def command_line(repeat):
    rows = []
    imports = wall([sys.executable, "-c", "import numpy, scipy.integrate, scipy.optimize, pint"],
                   repeat)
    rows.append(("bare import numpy, scipy.integrate, scipy.optimize, pint", imports, ""))
    rows.append(("python -c pass (interpreter start-up)", wall([sys.executable, "-c", "pass"],
                                                                 repeat), ""))
    rows.append(("python -c 'import screen'", wall([sys.executable, "-c", "import screen"],
                                                    repeat), "numpy, scipy load on first use"))
    rows.append(("runaway-screen --help", wall(CLI + ["--help"], repeat), ""))
    check = wall(CLI + ["check", CASE, "--json"], repeat)

    def ratio(value, reference, name):
        if value is None or reference is None:
            return ""
        return f"{value / reference:.2f} x {name}"

    rows.append(("check --json (one case)", check, ratio(check, imports, "bare import")))
    sweep = wall(CLI + ["sweep", CASE, "--vary", "vessel.coolant_temperature=0 degC:40 degC:200",
                        "--json"], max(1, repeat // 2))
    rows.append(("sweep, 200 points (--json)", sweep, ratio(sweep, check, "check")))
    uncertain = wall(CLI + ["check", UNCERTAIN_CASE, "--uncertainty", "100000", "--json"],
                     max(1, repeat // 2))
    rows.append(("check --uncertainty 100000 (8 inputs)", uncertain,
                 ratio(uncertain, check, "check")))
    with tempfile.TemporaryDirectory() as folder:
        sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
        from calorimetry_simulation import semibatch_trace, write_csv

        trace = os.path.join(folder, "trace.csv")
        write_csv(trace, semibatch_trace(dt=0.216),  # 100,001 rows
                  ["time_s", "reactor_temperature_degC", "heat_flow_W", "dosed_mass_kg"],
                  fmt="%.5f")
        heat_flow = wall(CLI + ["heat-flow", trace, "--initial-mass", "1.2 kg",
                                "--specific-heat", "1.9 kJ/(kg K)", "--feed-temperature",
                                "20 degC", "--json"], repeat)
    rows.append(("heat-flow, 100,000-row trace (--json)", heat_flow,
                 ratio(heat_flow, check, "check")))
    help_text = subprocess.run(CLI + ["--help"], capture_output=True, text=True).stdout
    if "\n  report" in help_text:
        with tempfile.TemporaryDirectory() as folder:
            pdf = os.path.join(folder, "out.pdf")
            report = wall(CLI + ["report", CASE, "-o", pdf, "--force"], max(1, repeat // 2))
        rows.append(("report (PDF)", report, ratio(report, check, "check")))
    return rows


def _naive_tmrad(kinetics_values, start_temperature, specific_heat):
    """TMRad by scipy solve_ivp of dT/dt with consumption, stopped at the maximum rate."""
    from scipy.integrate import solve_ivp

    from screen.constants import GAS_CONSTANT

    energy, activation_energy, log_factor, order = kinetics_values
    rise = energy / specific_heat
    t_final = start_temperature + rise

    def rate(temperature):
        remaining = max((t_final - temperature) / rise, 0.0)
        return rise * math.exp(log_factor - activation_energy / (GAS_CONSTANT * temperature)) \
            * remaining ** order

    def rhs(_time, state):
        return [rate(state[0])]

    def slope_of_log_rate(_time, state):  # zero at the maximum rate
        temperature = state[0]
        return activation_energy / (GAS_CONSTANT * temperature ** 2) \
            - order / max(t_final - temperature, 1e-300)

    slope_of_log_rate.terminal = True
    slope_of_log_rate.direction = -1.0
    solution = solve_ivp(rhs, (0.0, 1e12), [start_temperature], method="LSODA", rtol=1e-8,
                         atol=1e-8, events=slope_of_log_rate)
    return float(solution.t_events[0][0]) if solution.t_events[0].size else float("nan")


def monte_carlo(samples, naive_samples):
    import numpy as np

    from screen.io.case import load_case
    from screen.runs.screening import screen_case
    from screen.runs.uncertainty import run_monte_carlo

    rows = []
    variants = (("nth-order", []),
                ("zero-order", ["decomposition.model=zero-order"]),
                ("autocatalytic", ["decomposition.model=autocatalytic",
                                   "decomposition.autocatalytic_order=1",
                                   "decomposition.initial_conversion=0.01"]))
    nth_case = None
    for name, overrides in variants:
        if name == "zero-order":
            # zero order rejects `order`: start from a copy without it.
            text = open(UNCERTAIN_CASE, encoding="utf-8").read().replace("order = 1\n", "")
            handle, path = tempfile.mkstemp(suffix=".toml")
            with os.fdopen(handle, "w", encoding="utf-8") as stream:
                stream.write(text)
            case = load_case(path, overrides=overrides)
            os.unlink(path)
        else:
            case = load_case(UNCERTAIN_CASE, overrides=overrides)
        results = screen_case(case, curves=False).results
        run_monte_carlo(case, results, 1000, seed=1)  # warm-up (imports)
        start = time.perf_counter()
        run_monte_carlo(case, results, samples, seed=1)
        elapsed = time.perf_counter() - start
        rows.append((f"vectorised Monte Carlo, {name}, {samples} samples", elapsed,
                     f"{samples / elapsed:,.0f} samples/s (all figures)"))
        if name == "nth-order":
            nth_case = (case, results)

    # Naive baseline: one solve_ivp per sample for TMRad at MTSR only (nth order).
    case, results = nth_case
    run = run_monte_carlo(case, results, naive_samples, seed=2)
    from screen.runs.uncertainty import sampled_kinetics

    kinetics = sampled_kinetics(case, results, run.input_values)
    arrays = [np.broadcast_to(np.asarray(x, dtype=float), (naive_samples,))
              for x in (kinetics.energy, kinetics.activation_energy,
                        kinetics.log_pre_exponential_factor, kinetics.order)]
    cp = np.broadcast_to(run.input_values.get("mass.specific_heat",
                                              np.full(naive_samples, 1850.0)), (naive_samples,))
    mtsr = run.figures["mtsr"]
    start = time.perf_counter()
    naive = [_naive_tmrad(tuple(float(a[i]) for a in arrays), float(mtsr[i]), float(cp[i]))
             for i in range(naive_samples)]
    elapsed = time.perf_counter() - start
    vector = run.figures["tmrad_at_mtsr"]
    deviation = float(np.nanmax(np.abs(np.array(naive) / vector - 1.0)))
    rows.append((f"naive loop, solve_ivp per sample, {naive_samples} samples (TMRad only)",
                 elapsed, f"{naive_samples / elapsed:,.0f} samples/s; max. rel. difference "
                          f"to the vectorised TMRad {deviation:.1e}"))
    return rows


def portfolio(copies):
    from screen.runs.portfolio import screen_portfolio

    rows = []
    with tempfile.TemporaryDirectory() as folder:
        names = [n for n in sorted(os.listdir(os.path.join(ROOT, "cases")))
                 if n.endswith(".toml")]
        for index in range(copies):
            for name in names:
                shutil.copy(os.path.join(ROOT, "cases", name),
                            os.path.join(folder, f"{index:02d}_{name}"))
        count = copies * len(names)
        for workers in (1, 2):
            start = time.perf_counter()
            frame = screen_portfolio([folder], workers=workers)
            elapsed = time.perf_counter() - start
            errors = int(frame["error"].notna().sum())
            rows.append((f"batch, {count} cases, {workers} worker{'s' if workers > 1 else ''}",
                         elapsed, f"{count / elapsed:.2f} cases/s"
                         + (f" ({errors} error rows)" if errors else "")))
    return rows


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repetitions and samples")
    args = parser.parse_args(argv)
    repeat = 3 if args.quick else 5
    samples = 20_000 if args.quick else 100_000
    naive_samples = 20 if args.quick else 100
    copies = 2 if args.quick else 10
    load = os.getloadavg()
    print(f"Python {sys.version.split()[0]}, {os.cpu_count()} CPUs, load average before the run "
          f"{load[0]:.2f} / {load[1]:.2f} / {load[2]:.2f}")
    print()
    print("| what | wall time [s] (CPU where marked) | comparison |")
    print("|---|---:|---|")
    for section in (command_line(repeat), limits_rows(repeat, args.quick),
                    monte_carlo(samples, naive_samples), portfolio(copies)):
        for label, seconds, note in section:
            shown = "failed" if seconds is None else f"{seconds:.3f}"
            print(f"| {label} | {shown} | {note} |")
            sys.stdout.flush()
    load = os.getloadavg()
    print()
    print(f"Load average after the run {load[0]:.2f} / {load[1]:.2f} / {load[2]:.2f}")


if __name__ == "__main__":
    main()
