"""Independent simulations of calorimeter runs, used as check values by the tests.

These models share no code with the package: plain ``scipy.integrate.solve_ivp`` on the mole
and energy balances, with the published equations written out here. The parameters passed in
are the truth the tool must recover.

- :func:`semibatch_trace`: isothermal semi-batch reaction calorimetry. A (charged) + B (dosed)
  -> P, r = k n_A n_B / m, with a dosing pause, the sensible heat of a cold feed, a small
  temperature wobble, a linear baseline drift and white noise on the heat flow. The recorded
  heat flow is q_meas = q_rx - q_dos - m c'p dT_r/dt + baseline + noise.
- :func:`heat_wait_search_run`: adiabatic heat-wait-search run of a sample in a closed cell
  with thermal inertia phi: da/dt = A exp(-E/RT)(1-a)^n, dT/dt = heater + (dT_ad/phi) da/dt;
  heat steps, waits, searches against a self-heat-rate threshold, exotherm tracking, cool-down,
  and a pressure of vapour + pad gas + permanent gas.
"""

from __future__ import annotations

import numpy as np
from scipy.integrate import solve_ivp

R = 8.314462618  # J/(mol K), CODATA 2018


def feed_rate_profile(t, dosing_start, dosing_end, pause, feed_mass):
    """Constant feed rate [kg/s] between start and end except during the pause (start, end)."""
    active = (dosing_end - dosing_start) - (pause[1] - pause[0])
    rate = feed_mass / active
    t = np.asarray(t, dtype=float)
    on = (t >= dosing_start) & (t < dosing_end) & ~((t >= pause[0]) & (t < pause[1]))
    return np.where(on, rate, 0.0)


def dosed_mass_exact(t, dosing_start, dosing_end, pause, feed_mass):
    """Cumulative dosed mass [kg] (closed form of the piecewise constant rate)."""
    active = (dosing_end - dosing_start) - (pause[1] - pause[0])
    rate = feed_mass / active
    t = np.asarray(t, dtype=float)
    before_pause = np.clip(np.minimum(t, pause[0]) - dosing_start, 0.0, None)
    after_pause = np.clip(np.minimum(t, dosing_end) - pause[1], 0.0, None)
    return rate * (before_pause + after_pause)


def semibatch_trace(*, dt=2.0, t_end=6 * 3600.0, dosing_start=1800.0, dosing_end=9000.0,
                    pause=(4500.0, 5100.0), initial_mass=1.2, feed_mass=0.45, n_a0=1.8,
                    n_b_feed=1.5, rate_constant=3.0e-3, enthalpy=-125e3, cp=1900.0,
                    feed_cp=1700.0, feed_temperature=293.15, set_temperature=323.15,
                    wobble=0.3, baseline=(1.5, 0.8), noise=0.15, seed=1):
    """Simulate an isothermal semi-batch reaction-calorimetry trace.

    Returns a dict with the columns (``time_s``, ``reactor_temperature_degC``, ``heat_flow_W``,
    ``dosed_mass_kg``) and the truth (``reaction_heat_J``, ``accumulation`` array,
    ``max_accumulation``, ``time_of_max_accumulation_s`` (from the start of dosing),
    ``mtsr_K`` array, ...).
    """
    rng = np.random.default_rng(seed)
    time = np.arange(0.0, t_end + dt / 2, dt)
    period = 1500.0

    def temperature(t):
        return set_temperature + wobble * np.sin(2 * np.pi * t / period)

    def rhs(t, y):
        n_a, n_b, heat = y
        mass = initial_mass + dosed_mass_exact(t, dosing_start, dosing_end, pause, feed_mass)
        k = rate_constant  # isothermal kinetics: k at the set temperature (kg/(mol s))
        r = k * max(n_a, 0.0) * max(n_b, 0.0) / mass
        feed = feed_rate_profile(t, dosing_start, dosing_end, pause, feed_mass) / feed_mass * n_b_feed
        return [-r, float(feed) - r, -enthalpy * r]

    breaks = sorted({0.0, dosing_start, pause[0], pause[1], dosing_end, t_end})
    pieces = []
    y0 = [n_a0, 0.0, 0.0]
    for a, b in zip(breaks[:-1], breaks[1:]):
        mask = (time >= a) & (time <= b)
        sol = solve_ivp(rhs, (a, b), y0, rtol=1e-10, atol=1e-12, method="LSODA",
                        max_step=20.0, dense_output=True)
        pieces.append((mask, sol.sol(time[mask])))
        y0 = list(sol.y[:, -1])
    n_b = np.empty_like(time)
    heat = np.empty_like(time)
    for mask, y in pieces:
        n_b[mask] = y[1]
        heat[mask] = y[2]
    dosed = dosed_mass_exact(time, dosing_start, dosing_end, pause, feed_mass)
    mass = initial_mass + dosed
    temp = temperature(time)
    reacted = n_b_feed * dosed / feed_mass - n_b
    q_rx = -enthalpy * rate_constant * np.clip(n_a0 - reacted, 0, None) * np.clip(n_b, 0, None) / mass
    q_dos = feed_rate_profile(time, dosing_start, dosing_end, pause, feed_mass) * feed_cp * (
        temp - feed_temperature)
    q_sens = mass * cp * (2 * np.pi / period) * wobble * np.cos(2 * np.pi * time / period)
    base = baseline[0] + baseline[1] * time / t_end
    q_meas = q_rx - q_dos - q_sens + base + rng.normal(0.0, noise, time.size)
    total = float(heat[-1])
    x_th = heat / total
    fraction = dosed / feed_mass
    x_ac = fraction - x_th
    i_max = int(np.argmax(x_ac))
    mtsr = temp + np.clip(x_ac, 0, None) * total / (mass * cp)
    return {
        "time_s": time, "reactor_temperature_degC": temp - 273.15, "heat_flow_W": q_meas,
        "dosed_mass_kg": np.round(dosed, 4),
        "reaction_heat_J": total, "complete_heat_J": -enthalpy * n_b_feed,
        "accumulation": x_ac, "max_accumulation": float(x_ac[i_max]),
        "time_of_max_accumulation_s": float(time[i_max] - dosing_start),
        "dosing_time_s": dosing_end - dosing_start,
        "mass_ratio": float(mass[i_max] / (initial_mass + feed_mass)),
        "mtsr_max_K": float(mtsr.max()), "final_mass": initial_mass + feed_mass,
        "dosing_heat_J": float(feed_mass * feed_cp * (set_temperature - feed_temperature)),
    }


def write_csv(path, columns, names, fmt="%.6g", comments=()):
    """Write columns as a comma-separated file with a header line."""
    data = np.column_stack([columns[n] for n in names])
    with open(path, "w", encoding="utf-8") as handle:
        for line in comments:
            handle.write(f"# {line}\n")
        handle.write(",".join(names) + "\n")
        np.savetxt(handle, data, delimiter=",", fmt=fmt)


def heat_wait_search_run(*, activation_energy=110e3, pre_exponential_factor=None, order=1.0,
                         rise=250.0, phi=1.6, onset_target=423.15, threshold=0.02 / 60,
                         start=303.15, first_step=353.15, step=5.0, heater=2.0 / 60,
                         wait=1200.0, search=600.0, ambient=303.15, cooling_time=1800.0,
                         cool_down=7200.0, noise=0.004, seed=2, pad_pressure=1.0e5,
                         free_volume=5.0e-6, sample_mass=4.0e-3, gas_yield=0.2,
                         vapour=(11.0, 4000.0)):
    """Simulate a heat-wait-search run in a cell of thermal inertia ``phi``.

    ``pre_exponential_factor`` defaults to the value that makes the cell self-heat at
    ``threshold`` at ``onset_target``. Returns the columns (``time_s``, ``temperature_degC``,
    ``pressure_bar``) and the truth (``activation_energy``, ``pre_exponential_factor``,
    ``order``, ``rise``, ``phi``, ``gas_pressure_bar``, and a function ``tmr_phi_one(T0)``
    integrating the phi = 1 system from T0 to its maximum rate).
    """
    rise_cell = rise / phi
    if pre_exponential_factor is None:
        pre_exponential_factor = threshold / rise_cell * np.exp(activation_energy / (R * onset_target))
    a_fac = pre_exponential_factor

    def k(temp):
        return a_fac * np.exp(-activation_energy / (R * temp))

    def rhs_factory(heater_rate):
        def rhs(t, y):
            temp, alpha = y
            rate = k(temp) * max(1.0 - alpha, 0.0) ** order
            return [heater_rate + rise_cell * rate, rate]
        return rhs

    t_all, y_all = [], []

    def run(t0, y0, duration, heater_rate=0.0, events=None, max_step=30.0):
        sol = solve_ivp(rhs_factory(heater_rate), (t0, t0 + duration), y0, method="LSODA",
                        rtol=1e-9, atol=[1e-9, 1e-12], dense_output=True, events=events,
                        max_step=max_step)
        t_end = sol.t[-1]
        grid = np.arange(t0, t_end, 1.0)
        t_all.append(grid)
        y_all.append(sol.sol(grid))
        return t_end, list(sol.y[:, -1])

    def reach(target):
        def event(t, y):
            return y[0] - target
        event.terminal = True
        event.direction = 1
        return event

    t, y = 0.0, [start, 0.0]
    t, y = run(t, y, 10 * 3600, heater, [reach(first_step)])
    target = first_step
    exotherm = False
    for _ in range(60):
        t, y = run(t, y, wait)
        t_search = t
        temp_search = y[0]
        t, y = run(t, y, search)
        if (y[0] - temp_search) / (t - t_search) >= threshold:
            exotherm = True
            break
        target += step
        t, y = run(t, y, 3600, heater, [reach(target)])
    assert exotherm, "no exotherm detected in the simulated run"
    t_detect = t

    def settled(t, y):  # exotherm over: conversion complete
        return 1.0 - y[1] - 1e-5
    settled.terminal = True
    t, y = run(t, y, 200 * 3600, 0.0, [settled], max_step=5.0)
    t, y = run(t, y, 600.0)
    # cool-down: Newton cooling of the cell to ambient
    t_cool0, temp_cool0 = t, y[0]
    grid = np.arange(t, t + cool_down, 1.0)
    temp_cool = ambient + (temp_cool0 - ambient) * np.exp(-(grid - t_cool0) / cooling_time)
    t_all.append(grid)
    y_all.append(np.vstack([temp_cool, np.full(grid.size, y[1])]))

    time = np.concatenate(t_all)
    temp = np.concatenate([v[0] for v in y_all])
    alpha = np.concatenate([v[1] for v in y_all])
    keep_t, keep = [], []
    last_t, last_temp = -1e9, -1e9
    for i in range(time.size):  # log every 10 s or every 0.2 K, like an instrument
        if time[i] - last_t >= 10.0 or abs(temp[i] - last_temp) >= 0.2:
            keep.append(i)
            last_t, last_temp = time[i], temp[i]
    keep = np.array(keep)
    time, temp, alpha = time[keep], temp[keep], alpha[keep]
    _, unique = np.unique(time, return_index=True)
    time, temp, alpha = time[unique], temp[unique], alpha[unique]
    rng = np.random.default_rng(seed)
    measured = temp + rng.normal(0.0, noise, temp.size)
    gas_moles = gas_yield * sample_mass * alpha  # mol of permanent gas
    pressure = (np.exp(vapour[0] - vapour[1] / temp)  # invented vapour pressure, Pa
                + pad_pressure * temp / start + gas_moles * R * temp / free_volume)

    def tmr_phi_one(t0):
        """Time [s] from T0 to the maximum self-heat rate of the phi = 1 system (a0 = 0)."""
        def rhs(t, y):
            temp_, alpha_ = y
            rate = k(temp_) * max(1.0 - alpha_, 0.0) ** order
            return [rise * rate, rate]
        sol = solve_ivp(rhs, (0.0, 1e9), [t0, 0.0], method="LSODA", rtol=1e-10,
                        atol=[1e-10, 1e-13], dense_output=True,
                        events=[lambda t, y: 1.0 - y[1] - 1e-4])
        ts = np.linspace(0.0, sol.t[-1], 400001)
        yy = sol.sol(ts)
        rates = rise * k(yy[0]) * np.clip(1.0 - yy[1], 0, None) ** order
        i = int(np.argmax(rates))
        lo, hi = max(i - 2, 0), min(i + 2, ts.size - 1)
        fine = np.linspace(ts[lo], ts[hi], 20001)
        yf = sol.sol(fine)
        rf = rise * k(yf[0]) * np.clip(1.0 - yf[1], 0, None) ** order
        return float(fine[int(np.argmax(rf))])

    i_detect = int(np.searchsorted(time, t_detect))
    return {
        "time_s": time, "temperature_degC": measured - 273.15, "pressure_bar": pressure / 1e5,
        "activation_energy": activation_energy, "pre_exponential_factor": a_fac,
        "order": order, "rise": rise, "phi": phi, "threshold": threshold,
        "true_temperature": temp, "conversion": alpha, "detected_at_s": t_detect,
        "detected_at_K": float(temp[i_detect]),
        "gas_pressure_bar": float(gas_moles[-1] * R * temp[-1] / free_volume / 1e5),
        "rate_constant": k, "tmr_phi_one": tmr_phi_one,
    }
