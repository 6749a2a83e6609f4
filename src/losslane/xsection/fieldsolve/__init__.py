"""2-D quasi-static field solver: layered cross-sections with trapezoidal conductors and
conformal coatings, solved by finite elements (scikit-fem) into per-unit-length RLGC.

Modules: ``geometry`` (the description), ``mesh`` (graded boundary-fitted triangles),
``solve`` (electrostatics, energy partition, surface-current loss factors, cache),
``section`` (the CrossSection giving R, L, G, C over frequency), ``builders`` (the
scenario kinds mapped onto it), ``plot`` (a picture of the section and its field).
scikit-fem and matplotlib are imported only inside the functions that use them.
"""

__all__ = ["Coating", "Geometry", "Layer", "Trace"]


def __getattr__(name: str):
    # lazy: the line factory imports fieldsolve.keys at start-up, not the solver
    if name in __all__:
        from losslane.xsection.fieldsolve import geometry

        return getattr(geometry, name)
    raise AttributeError(name)
