"""Print the key tables of docs/case-format.md from screen.io.schema.SCHEMA (run by a developer)."""

from screen.io.schema import SCHEMA
from screen.units import DIMENSIONS, EXAMPLES


def main():
    for section, fields in SCHEMA.items():
        print(f"\n### [{section}]\n")
        if not fields:
            print("Free-form: see docs/uncertainty.md.")
            continue
        print("| key | kind (SI unit) | required | meaning | example |")
        print("|---|---|---|---|---|")
        for key, spec in fields.items():
            kind = spec.kind
            example = EXAMPLES.get(kind, "")
            if kind == "choice":
                example = " / ".join(f'"{c}"' for c in spec.choices)
            elif kind == "number":
                example = '0.35 or "35 %"'
            elif kind == "text":
                example = '"..."'
            elif kind == "bool":
                example = "true / false"
            elif kind == "rate_constant":
                example = '"2.1e-3 1/s" or "0.8 L/(mol s)"'
            unit = DIMENSIONS[kind][1] if kind in DIMENSIONS else "-"
            bounds = []
            if spec.minimum is not None:
                bounds.append((">" if spec.exclusive_minimum else ">=") + f" {spec.minimum:g}")
            if spec.maximum is not None:
                bounds.append(("<" if spec.exclusive_maximum else "<=") + f" {spec.maximum:g}")
            bound_text = f" ({', '.join(bounds)})" if bounds else ""
            print(f"| `{key}` | {kind.replace('_', ' ')} ({unit}){bound_text} | "
                  f"{'yes' if spec.required else ''} | {spec.doc} | {example.replace('|', '/')} |")


if __name__ == "__main__":
    main()
