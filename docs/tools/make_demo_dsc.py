"""Generate the invented DSC demo data under cases/dsc/.

INVENTED DEMO DATA. "Halvorsen Fine Chemicals", its products and its instruments are invented;
the thermograms are simulated from known kinetics (scipy solve_ivp of
d alpha/dt = A exp(-E/(R T)) f(alpha) under linear heating), with invented sample masses,
baselines, noise and export styles. They show the accepted file formats and exercise the
``runaway-screen kinetics`` command. They are never used as check values in tests.

Run from the repository root:  python docs/tools/make_demo_dsc.py
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
from scipy.integrate import solve_ivp

GAS_CONSTANT = 8.314462618  # J/(mol K); same pinned value as screen.constants
ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "cases" / "dsc"

HEADER = (
    "INVENTED DEMO DATA of the invented company Halvorsen Fine Chemicals "
    "(simulated from known kinetics by docs/tools/make_demo_dsc.py; not a measurement)"
)


def simulate(beta_k_min, energy, a, n, m, alpha0, q_total, t_start_c=30.0, t_end_c=380.0,
             points=2400):
    """Time [s], temperature [K], conversion and specific heat flow [W/kg]."""
    beta = beta_k_min / 60.0
    t0 = t_start_c + 273.15
    t_end = (t_end_c - t_start_c) / beta

    def rhs(t, y):
        temp = t0 + beta * t
        x = min(max(y[0], 0.0), 1.0)
        f = (1.0 - x) ** n * (x**m if m else 1.0)
        return [a * np.exp(-energy / (GAS_CONSTANT * temp)) * f]

    time = np.linspace(0.0, t_end, points)
    sol = solve_ivp(rhs, (0.0, t_end), [alpha0], t_eval=time, method="LSODA",
                    rtol=1e-9, atol=1e-12)
    alpha = np.clip(sol.y[0], 0.0, 1.0)
    temp = t0 + beta * time
    f = (1.0 - alpha) ** n * (alpha**m if m else 1.0)
    rate = a * np.exp(-energy / (GAS_CONSTANT * temp)) * f
    return time, temp, alpha, rate * q_total


def write(path, lines):
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    print("wrote", path.relative_to(ROOT))


def main():
    OUT.mkdir(parents=True, exist_ok=True)
    rng = np.random.default_rng(20240607)

    # --- HF-417 nitration residue (invented): nth-order decomposition ----------------------
    kin = dict(energy=128e3, a=2.3e10, n=1.4, m=0.0, alpha0=0.0, q_total=720e3)
    peaks = []
    masses = {2: 2.41, 4: 2.87, 8: 1.96, 16: 2.18}  # mg
    for beta in (2, 4, 8, 16):
        time, temp, alpha, q = simulate(beta, **kin)
        mass_mg = masses[beta]
        drift = 0.02e3 + 0.05 * (temp - 303.15)  # W/kg, invented instrument baseline
        noise = rng.normal(0.0, 4.0, temp.size)  # W/kg
        signal = q + drift + noise
        peak_c = temp[np.argmax(q)] - 273.15
        peaks.append((beta, peak_c))
        if beta == 2:
            # comma separated, mW, exo up, metadata as comment lines
            mw = signal * mass_mg * 1e-6 * 1e3
            lines = [f"# {HEADER}",
                     "# Material: HF-417 nitration residue (invented), gold-plated high-pressure crucible",
                     f"# sample_mass = {mass_mg} mg", f"# heating_rate = {beta} K/min",
                     "# exotherm = up",
                     "time (min),temperature (°C),heat flow (mW)"]
            lines += [f"{t / 60:.4f},{c - 273.15:.3f},{h:.5f}" for t, c, h in zip(time, temp, mw)]
            write(OUT / "hf417_residue_02Kmin.csv", lines)
        elif beta == 4:
            # semicolon separated, decimal comma, mW/mg, exo down, free-text preamble
            wg = -signal / 1e3
            lines = [f"# {HEADER}",
                     "Material;HF-417 nitration residue (invented)",
                     f"Sample mass;{str(mass_mg).replace('.', ',')};mg",
                     f"Heating rate;{beta};K/min",
                     "",
                     "time (s);temperature (°C);heat flow (mW/mg) exo down"]
            lines += [f"{t:.2f};{c - 273.15:.3f};{h:.6f}".replace(".", ",")
                      for t, c, h in zip(time, temp, wg)]
            write(OUT / "hf417_residue_04Kmin.csv", lines)
        elif beta == 8:
            # tab separated, W/g, no time column, exo up; small melting endotherm at 85 degC
            melt = -25e3 * np.exp(-0.5 * ((temp - 358.15) / 1.5) ** 2) / (1.5 * np.sqrt(2 * np.pi)) * (beta / 60)
            wg = (signal + melt) / 1e3
            lines = [f"# {HEADER}",
                     "# Material: HF-417 nitration residue (invented); small melting endotherm near 85 degC",
                     f"# heating_rate = {beta} K/min",
                     "temperature (°C)\theat flow (W/g) exo up"]
            lines += [f"{c - 273.15:.3f}\t{h:.6f}" for c, h in zip(temp, wg)]
            write(OUT / "hf417_residue_08Kmin.csv", lines)
        else:
            # comma separated, seconds and kelvin, mW, exo up, mass on the command line or header
            mw = signal * mass_mg * 1e-6 * 1e3
            lines = [f"# {HEADER}", "# Material: HF-417 nitration residue (invented)",
                     f"# sample_mass = {mass_mg} mg",
                     "time (s),temperature (K),heat flow (mW) exo up"]
            lines += [f"{t:.2f},{c:.3f},{h:.5f}" for t, c, h in zip(time, temp, mw)]
            write(OUT / "hf417_residue_16Kmin.csv", lines)
    lines = [f"# {HEADER}", "# Material: HF-417 nitration residue (invented); peak maxima of the four runs",
             "run,heating_rate_K_per_min,peak_temperature_degC"]
    lines += [f"HF417-{b:02d},{b},{p:.1f}" for b, p in peaks]
    write(OUT / "hf417_residue_peaks.csv", lines)

    # --- HF-233 distillation bottoms (invented): autocatalytic decomposition ----------------
    kin = dict(energy=105e3, a=4.0e10, n=1.1, m=0.9, alpha0=5e-4, q_total=1150e3)
    for beta, mass_mg in ((1, 1.52), (2, 1.48), (4, 1.61), (8, 1.55)):
        time, temp, alpha, q = simulate(beta, t_start_c=30.0, t_end_c=330.0, **kin)
        signal = q + 0.03 * (temp - 303.15) + rng.normal(0.0, 6.0, temp.size)
        mw = signal * mass_mg * 1e-6 * 1e3
        lines = [f"# {HEADER}",
                 "# Material: HF-233 distillation bottoms (invented), autocatalytic decomposition",
                 f"# sample_mass = {mass_mg} mg", f"# heating_rate = {beta} K/min",
                 "time (min),temperature (°C),heat flow (mW)"]
        lines += [f"{t / 60:.4f},{c - 273.15:.3f},{h:.5f}" for t, c, h in zip(time, temp, mw)]
        write(OUT / f"hf233_bottoms_{beta:02d}Kmin.csv", lines)


if __name__ == "__main__":
    main()
