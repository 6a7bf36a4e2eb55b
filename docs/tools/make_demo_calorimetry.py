"""Generate the invented calorimetry demo data under cases/calorimetry/.

INVENTED DEMO DATA. "Halvorsen Fine Chemicals", its products and its instruments are invented.
The runs are simulated from known parameters by the independent models of the test suite
(tests/calorimetry_simulation.py: scipy solve_ivp of the mole and energy balances), with noise,
baseline drift, a dosing pause and heat-wait-search steps. They show the file formats and
exercise ``runaway-screen heat-flow`` and ``runaway-screen kinetics --adiabatic``; they are
never check values in tests.

Run from the repository root:  python docs/tools/make_demo_calorimetry.py
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "tests"))

from calorimetry_simulation import heat_wait_search_run, semibatch_trace, write_csv  # noqa: E402

OUT = ROOT / "cases" / "calorimetry"


def main():
    OUT.mkdir(parents=True, exist_ok=True)
    trace = semibatch_trace(dt=5.0, t_end=6.5 * 3600, dosing_start=2400.0, dosing_end=10200.0,
                            pause=(5400.0, 6300.0), initial_mass=1.2, feed_mass=0.45, n_a0=1.8,
                            n_b_feed=1.5, rate_constant=2.5e-3, enthalpy=-118e3, cp=1900.0,
                            feed_cp=1700.0, feed_temperature=293.15, set_temperature=323.15,
                            wobble=0.25, baseline=(1.2, 0.6), noise=0.2, seed=330)
    write_csv(OUT / "hf330_heat_flow_semibatch.csv", trace,
              ["time_s", "reactor_temperature_degC", "heat_flow_W", "dosed_mass_kg"], fmt="%.5f",
              comments=[
                  "INVENTED DEMO DATA of the invented company Halvorsen Fine Chemicals: HF-330 "
                  "acylation, reaction calorimeter run HC-2305 (not a measurement)",
                  "Simulated from known parameters by docs/tools/make_demo_calorimetry.py: "
                  "A + B -> P, dH = -118 kJ/mol, 1.5 mol B dosed as 0.45 kg at 20 degC into "
                  "1.2 kg at 50 degC, c'p 1.9 kJ/(kg K), feed c'p 1.7 kJ/(kg K), dosing "
                  "0.67-2.83 h with a pause 1.50-1.75 h, baseline drift, noise",
              ])
    run = heat_wait_search_run(activation_energy=125e3, order=1.5, rise=290.0, phi=1.75,
                               onset_target=438.15, first_step=373.15, step=5.0, noise=0.004,
                               seed=233, sample_mass=3.5e-3, gas_yield=0.3)
    write_csv(OUT / "hf233_adiabatic_run.csv", run, ["time_s", "temperature_degC", "pressure_bar"],
              fmt="%.5f", comments=[
                  "INVENTED DEMO DATA of the invented company Halvorsen Fine Chemicals: HF-233 "
                  "distillation bottoms, adiabatic heat-wait-search run AD-1187 (not a measurement)",
                  "Simulated from known parameters by docs/tools/make_demo_calorimetry.py: "
                  "E = 125 kJ/mol, order 1.5, adiabatic rise 290 K at phi = 1, phi = 1.75 "
                  "(3.5 g sample, c'p 1.9 J/(g K); 9.5 g cell, c'p 0.525 J/(g K)), 5 K steps "
                  "from 100 degC, threshold 0.02 K/min, cool-down, permanent gas",
              ])


if __name__ == "__main__":
    main()
