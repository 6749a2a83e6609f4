"""The scenario keys of the field solver, kept apart from the solver so that the line
factory can check a spec without importing it (start-up time)."""

#: keys the field solver accepts on top of each kind's own keys
EXTRA_KEYS = (
    "top_width",
    "etch_factor",
    "coating_thickness",
    "coating_dielectric",
    "dielectric_above",
    "accuracy",
)
#: extra keys whose values are dielectrics (names are resolved by the caller)
DIELECTRIC_KEYS = ("coating_dielectric", "dielectric_above")
#: the mesh settings (``solve.LEVELS`` maps them to mesh levels)
ACCURACIES = ("coarse", "normal", "fine")
