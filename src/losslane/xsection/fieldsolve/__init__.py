"""2-D quasi-static field solver: layered cross-sections with trapezoidal conductors and
conformal coatings, solved by finite elements (scikit-fem) into per-unit-length RLGC.

Modules: ``geometry`` (the description), ``layouts`` (a model's dimensions as a
geometry: each model class names its layout), ``mesh`` (graded boundary-fitted
triangles), ``solve`` (electrostatics, energy partition, surface-current loss factors,
the cache of solved sections), ``section`` (the CrossSection giving R, L, G, C over
frequency), ``options`` (the solver's scenario keys), ``keys`` (their names, importable
without the solver). The picture of a section and its field is drawn by
``losslane.report.line_picture``. scikit-fem is imported only inside the functions that
use it.
"""

__all__ = ["Coating", "Geometry", "Layer", "Trace"]


def __getattr__(name: str):
    # lazy: the line factory imports fieldsolve.keys at start-up, not the solver
    if name in __all__:
        from losslane.xsection.fieldsolve import geometry

        return getattr(geometry, name)
    raise AttributeError(name)
