"""Generate ``screen/data/solvents.csv`` from the ``chemicals`` package.

Run once by a developer after a change of the solvent list or of the ``chemicals`` version::

    python docs/tools/generate_solvent_table.py            # rewrite the shipped table
    python docs/tools/generate_solvent_table.py --check    # exit 1 if the shipped table differs

The runtime code never imports ``chemicals`` (it loads ~75 MB of tables and takes ~0.5 s); it
reads the small CSV written here. ``tests/test_solvents.py`` regenerates the table in memory and
compares it with the shipped file, and checks the runtime functions against ``chemicals`` directly.

Sources, per column (all through ``chemicals``, Caleb Bell, Chemical Engineering Design Library):

- molar mass: ``chemicals.identifiers.search_chemical(CAS).MW`` (formula and IUPAC atomic weights);
- normal boiling point: ``chemicals.phase_change.Tb`` with its first available method (named);
- critical temperature: ``chemicals.critical.Tc`` with its first available method (named);
- vapour pressure: DIPPR EQ101 coefficients of Perry's Chemical Engineers' Handbook, 8th ed.
  (Green & Perry 2008), Table 2-8 (``Psat_data_Perrys2_8``); where that table has no entry, the
  Antoine coefficients of Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids, 5th ed.
  (2001), Appendix A (``Psat_data_AntoinePoling``, log10, Pa, K), then the Antoine coefficients of
  the Landolt-Boernstein compilations by Hall and Dykyj (1999-2001) (``Psat_data_Landolt_Antoine``,
  natural log, Pa, K). Each row names its equation and source;
- latent heat: the CRC Handbook value at the boiling point (``Hvap_data_CRC``, ``HvapTb`` at the
  CRC ``Tb``); else the CRC value at 298.15 K; else an estimate at the normal boiling point with
  the Vetere method (``chemicals.phase_change.Vetere``, Perry's 8th ed. form; Vetere, Fluid Phase
  Equilibria 106 (1995) 1-10). The runtime scales it with the Watson correlation;
- liquid density at 25 degC and at the normal boiling point: DIPPR EQ105 of Perry's 8th ed.
  Table 2-32 (``rho_data_Perry_8E_105_l``); else the VDI Heat Atlas PPDS equation
  (``rho_data_VDI_PPDS_2``); else a COSTALD estimate (Hankinson & Thomson 1979) from the
  ``chemicals`` critical temperature, critical volume and acentric factor.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

#: The table: CAS, preferred name, accepted aliases (matched case-insensitively, ignoring spaces,
#: hyphens and underscores). Ambiguous names (xylene, butanol, ether, ...) are handled at run time
#: in screen/models/solvents.py and are not aliases here.
SOLVENTS: list[tuple[str, str, list[str]]] = [
    ("7732-18-5", "water", ["H2O"]),
    ("67-56-1", "methanol", ["MeOH", "methyl alcohol"]),
    ("64-17-5", "ethanol", ["EtOH", "ethyl alcohol"]),
    ("67-63-0", "2-propanol", ["isopropanol", "IPA", "isopropyl alcohol", "propan-2-ol"]),
    ("71-36-3", "1-butanol", ["n-butanol", "butan-1-ol", "n-butyl alcohol"]),
    ("67-64-1", "acetone", ["propanone", "2-propanone", "dimethyl ketone"]),
    ("78-93-3", "2-butanone", ["MEK", "methyl ethyl ketone", "butanone", "butan-2-one"]),
    ("141-78-6", "ethyl acetate", ["EtOAc", "ethyl ethanoate"]),
    ("108-21-4", "isopropyl acetate", ["IPAc", "iPrOAc", "isopropyl ethanoate"]),
    ("109-99-9", "tetrahydrofuran", ["THF", "oxolane"]),
    ("96-47-9", "2-methyltetrahydrofuran", ["2-MeTHF", "MeTHF", "2-methyloxolane"]),
    ("60-29-7", "diethyl ether", ["Et2O", "ethoxyethane"]),
    ("1634-04-4", "methyl tert-butyl ether", ["MTBE", "TBME", "tert-butyl methyl ether"]),
    ("75-09-2", "dichloromethane", ["DCM", "methylene chloride"]),
    ("67-66-3", "chloroform", ["trichloromethane"]),
    ("108-88-3", "toluene", ["methylbenzene"]),
    ("95-47-6", "o-xylene", ["ortho-xylene", "1,2-dimethylbenzene"]),
    ("108-38-3", "m-xylene", ["meta-xylene", "1,3-dimethylbenzene"]),
    ("106-42-3", "p-xylene", ["para-xylene", "1,4-dimethylbenzene"]),
    ("108-90-7", "chlorobenzene", ["monochlorobenzene", "MCB", "PhCl"]),
    ("75-05-8", "acetonitrile", ["MeCN", "ACN", "methyl cyanide"]),
    ("68-12-2", "N,N-dimethylformamide", ["DMF", "dimethylformamide"]),
    ("67-68-5", "dimethyl sulfoxide", ["DMSO", "dimethyl sulphoxide"]),
    ("872-50-4", "N-methyl-2-pyrrolidone", ["NMP", "1-methyl-2-pyrrolidinone"]),
    ("142-82-5", "n-heptane", ["heptane"]),
    ("110-54-3", "n-hexane", ["hexane"]),
    ("110-82-7", "cyclohexane", []),
    ("64-19-7", "acetic acid", ["AcOH", "ethanoic acid", "glacial acetic acid"]),
    ("123-91-1", "1,4-dioxane", ["dioxane", "p-dioxane"]),
    ("110-86-1", "pyridine", []),
]

#: Solvents whose vapour dimerises, so that the Watson scaling of the latent heat does not hold
#: (acetic acid: the Perry's Table 2-150 curve is nearly flat, 23.4-24.0 kJ/mol from 300 K to
#: 450 K, while Watson from the boiling point gives +16 % at 300 K). The runtime keeps the latent
#: heat constant at the reference value, which stays within 1.3 % of that curve and below it above
#: 300 K (a lower latent heat means more vapour: the conservative side).
CONSTANT_LATENT_HEAT = {"64-19-7": "vapour dimerises: latent heat kept constant (Watson not valid)"}

COLUMNS = [
    "cas",
    "name",
    "aliases",
    "molar_mass_g_per_mol",
    "normal_boiling_point_K",
    "normal_boiling_point_source",
    "critical_temperature_K",
    "critical_temperature_source",
    "vapour_pressure_equation",
    "A",
    "B",
    "C",
    "D",
    "E",
    "Tmin_K",
    "Tmax_K",
    "vapour_pressure_source",
    "latent_heat_J_per_mol",
    "latent_heat_reference_temperature_K",
    "latent_heat_model",
    "latent_heat_source",
    "liquid_density_25C_kg_per_m3",
    "liquid_density_at_boiling_point_kg_per_m3",
    "liquid_density_source",
    "note",
]

DEFAULT_OUTPUT = Path(__file__).resolve().parents[2] / "screen" / "data" / "solvents.csv"


def _number(value: float) -> str:
    """Source coefficients verbatim (shortest round-trip representation)."""
    return repr(float(value))


def _derived(value: float) -> str:
    """Values computed here (densities): six significant digits are plenty."""
    return f"{float(value):.6g}"


def _vapour_pressure_row(cas: str) -> dict[str, str]:
    from chemicals import vapor_pressure

    perry = vapor_pressure.Psat_data_Perrys2_8
    if cas in perry.index:
        row = perry.loc[cas]
        return {
            "vapour_pressure_equation": "DIPPR101",
            "A": _number(row.C1),
            "B": _number(row.C2),
            "C": _number(row.C3),
            "D": _number(row.C4),
            "E": _number(row.C5),
            "Tmin_K": _number(row.Tmin),
            "Tmax_K": _number(row.Tmax),
            "vapour_pressure_source": "Perry's 8th ed. Table 2-8 (DIPPR EQ101), chemicals Psat_data_Perrys2_8",
        }
    poling = vapor_pressure.Psat_data_AntoinePoling
    if cas in poling.index:
        row = poling.loc[cas]
        return {
            "vapour_pressure_equation": "ANTOINE10",
            "A": _number(row.A),
            "B": _number(row.B),
            "C": _number(row.C),
            "D": "",
            "E": "",
            "Tmin_K": _number(row.Tmin),
            "Tmax_K": _number(row.Tmax),
            "vapour_pressure_source": "Poling et al. 5th ed. (2001) App. A Antoine, chemicals Psat_data_AntoinePoling",
        }
    landolt = vapor_pressure.Psat_data_Landolt_Antoine
    if cas in landolt.index:
        row = landolt.loc[cas]
        return {
            "vapour_pressure_equation": "ANTOINE_E",
            "A": _number(row.A),
            "B": _number(row.B),
            "C": _number(row.C),
            "D": "",
            "E": "",
            "Tmin_K": _number(row.Tmin),
            "Tmax_K": _number(row.Tmax),
            "vapour_pressure_source": "Landolt-Boernstein Antoine (Hall; Dykyj & Hall 1999-2001), chemicals Psat_data_Landolt_Antoine",
        }
    raise SystemExit(f"{cas}: no vapour-pressure coefficients in chemicals")


def _latent_heat_row(cas: str) -> dict[str, str]:
    from chemicals import phase_change

    model = "constant" if cas in CONSTANT_LATENT_HEAT else "watson"
    crc = phase_change.Hvap_data_CRC
    if cas in crc.index:
        row = crc.loc[cas]
        if not math.isnan(row.HvapTb):
            return {
                "latent_heat_J_per_mol": _number(row.HvapTb),
                "latent_heat_reference_temperature_K": _number(row.Tb),
                "latent_heat_model": model,
                "latent_heat_source": "CRC Handbook at its Tb, chemicals Hvap_data_CRC",
            }
        if not math.isnan(row.Hvap298):
            return {
                "latent_heat_J_per_mol": _number(row.Hvap298),
                "latent_heat_reference_temperature_K": "298.15",
                "latent_heat_model": model,
                "latent_heat_source": "CRC Handbook at 298.15 K, chemicals Hvap_data_CRC",
            }
    # No measured value in the CRC table: estimate at the normal boiling point with the Vetere
    # method (chemicals implements the form printed in Perry's 8th ed., p. 2-487). The only other
    # value in chemicals for NMP (Gharagheizi, 298.15 K) scales with Watson to 50 kJ/mol at Tb,
    # 10 % above the Clausius-Clapeyron slope of its vapour-pressure curve: rejected.
    from chemicals import critical

    boiling_point = phase_change.Tb(cas, method=phase_change.Tb_methods(cas)[0])
    return {
        "latent_heat_J_per_mol": _derived(phase_change.Vetere(boiling_point, critical.Tc(cas), critical.Pc(cas))),
        "latent_heat_reference_temperature_K": _number(boiling_point),
        "latent_heat_model": model,
        "latent_heat_source": "Vetere estimate at Tb (Perry's 8th ed. form), chemicals phase_change.Vetere",
    }
    raise SystemExit(f"{cas}: no latent heat in chemicals")


def _liquid_density_row(cas: str, molar_mass: float, boiling_point: float) -> dict[str, str]:
    from chemicals import acentric, critical, dippr, volume

    temperatures = (298.15, boiling_point)
    perry = volume.rho_data_Perry_8E_105_l
    vdi = volume.rho_data_VDI_PPDS_2
    if cas in perry.index:
        row = perry.loc[cas]
        # EQ105 with these coefficients gives mol/m^3; times g/mol / 1000 gives kg/m^3.
        densities = [dippr.EQ105(t, row.C1, row.C2, row.C3, row.C4) * molar_mass / 1000.0 for t in temperatures]
        source = "Perry's 8th ed. Table 2-32 (DIPPR EQ105), chemicals rho_data_Perry_8E_105_l"
    elif cas in vdi.index:
        row = vdi.loc[cas]
        # volume_VDI_PPDS returns m^3/mol; molar mass in g/mol / 1000 gives kg/mol.
        densities = [
            molar_mass / 1000.0 / volume.volume_VDI_PPDS(t, row.Tc, row.rhoc, row.A, row.B, row.C, row.D, molar_mass)
            for t in temperatures
        ]
        source = "VDI Heat Atlas PPDS equation, chemicals rho_data_VDI_PPDS_2"
    else:
        tc, vc, omega = critical.Tc(cas), critical.Vc(cas), acentric.omega(cas)
        densities = [molar_mass / 1000.0 / volume.COSTALD(t, tc, vc, omega) for t in temperatures]
        source = "COSTALD estimate (Hankinson & Thomson 1979) from chemicals Tc, Vc, omega"
    return {
        "liquid_density_25C_kg_per_m3": _derived(densities[0]),
        "liquid_density_at_boiling_point_kg_per_m3": _derived(densities[1]),
        "liquid_density_source": source,
    }


def build_rows() -> list[dict[str, str]]:
    """One dict per solvent with every column of :data:`COLUMNS` as text."""
    from chemicals import critical, phase_change
    from chemicals.identifiers import search_chemical

    rows = []
    for cas, name, aliases in SOLVENTS:
        molar_mass = float(search_chemical(cas).MW)
        boiling_method = phase_change.Tb_methods(cas)[0]
        boiling_point = float(phase_change.Tb(cas, method=boiling_method))
        critical_method = critical.Tc_methods(cas)[0]
        row = {
            "cas": cas,
            "name": name,
            "aliases": ";".join(aliases),
            "molar_mass_g_per_mol": _number(molar_mass),
            "normal_boiling_point_K": _number(boiling_point),
            "normal_boiling_point_source": f"chemicals Tb method {boiling_method}",
            "critical_temperature_K": _number(critical.Tc(cas, method=critical_method)),
            "critical_temperature_source": f"chemicals Tc method {critical_method}",
        }
        row.update(_vapour_pressure_row(cas))
        row.update(_latent_heat_row(cas))
        row.update(_liquid_density_row(cas, molar_mass, boiling_point))
        row["note"] = CONSTANT_LATENT_HEAT.get(cas, "")
        rows.append(row)
    return rows


def render_table(rows: list[dict[str, str]], chemicals_version: str) -> str:
    """The CSV text: comment lines naming the sources, a header line and one line per solvent."""
    import csv
    import io

    header = [
        "# Solvent property table of runaway-screen, read by screen/models/solvents.py.",
        (
            "# Generated from the chemicals package (Caleb Bell, Chemical Engineering Design Library), "
            "DIPPR/Perry's 8th ed. Table 2-8 coefficients"
        ),
        f"# chemicals version {chemicals_version}",
        "# Do not edit by hand: regenerate with python docs/tools/generate_solvent_table.py",
        (
            "# Vapour pressure p [Pa], T [K]: DIPPR101 ln p = A + B/T + C ln T + D T^E; "
            "ANTOINE10 log10 p = A - B/(T + C); ANTOINE_E ln p = A - B/(T + C); valid for Tmin_K <= T <= Tmax_K."
        ),
        (
            "# Latent heat: value at the reference temperature [J/mol], scaled at run time with the Watson "
            "correlation (exponent 0.38) to the critical temperature, or kept constant where noted."
        ),
        "# Each row names the source of every property; see the docstring of the generator.",
    ]
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=COLUMNS, lineterminator="\n")
    writer.writeheader()
    writer.writerows(rows)
    return "\n".join(header) + "\n" + buffer.getvalue()


def build_table_text() -> str:
    """The full CSV text as this script would write it."""
    import chemicals

    return render_table(build_rows(), chemicals.__version__)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=DEFAULT_OUTPUT, help="CSV file to write")
    parser.add_argument("--check", action="store_true", help="compare with the file, write nothing")
    arguments = parser.parse_args(argv)
    text = build_table_text()
    if arguments.check:
        current = arguments.output.read_text(encoding="utf-8") if arguments.output.exists() else ""
        if current != text:
            print(f"{arguments.output} differs from the regenerated table", file=sys.stderr)
            return 1
        print(f"{arguments.output} is up to date")
        return 0
    arguments.output.write_text(text, encoding="utf-8")
    print(f"wrote {arguments.output} ({len(SOLVENTS)} solvents)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
