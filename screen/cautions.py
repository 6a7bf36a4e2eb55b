"""The cautions every output carries (terminal, JSON, PDF). Imports nothing."""

CAUTIONS = (
    "Screening aid only: it does not replace a qualified process-safety review.",
    "Results hold only for the data and assumptions stated here; they are as good as the input "
    "data (calorimetry, kinetics, vessel data).",
    "A qualified process-safety review, local codes and regulations, and licensed engineering "
    "practice decide; they prevail over any figure of this tool.",
    "Rerun the screening after any change of recipe, equipment, scale or data.",
)

SHORT_CAUTION = ("SCREENING AID ONLY - results depend on input data quality; a qualified "
                 "process-safety review, local codes and regulations decide.")
