"""scikit-rf's microstrip conductor loss against the eddy-current field solution.

For a few smooth-copper microstrips (1 oz plane) this prints the conductor attenuation of
scikit-rf's ``MLine`` (Hammerstad-Jensen, its ``alpha_conductor``) over the eddy-current
solver's R / (2 Z0), Z0 the field solver's impedance, and losslane's closed form's
R over the eddy-current R, at 1-20 GHz. Run from the repository root:
``python tools/skrf_conductor_vs_eddy.py`` (about a minute).
"""

from __future__ import annotations

import warnings

import numpy as np

from losslane.materials.dielectric import ConstantDielectric
from losslane.units import MIL, OZ_COPPER
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve import Geometry, Layer, Trace
from losslane.xsection.fieldsolve.eddy import eddy_impedance
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.section import FieldSection
from losslane.xsection.microstrip import Microstrip

F = np.array([1e9, 3e9, 10e9, 20e9])
DK = 3.7
CASES = [
    (6.0, 3.5, 1.0),
    (10.0, 6.0, 2.0),
    (4.0, 3.0, 0.5),
    (20.0, 10.0, 1.0),
    (12.0, 4.0, 1.0),
    (30.0, 8.0, 1.0),
]


def main() -> None:
    import skrf as rf
    from skrf.media import MLine

    d = ConstantDielectric(DK)
    print("| microstrip | f (GHz) | scikit-rf / eddy current | losslane / eddy current |")
    print("|---|---|---|---|")
    for w, h, t_oz in CASES:
        w_, h_, t = w * MIL, h * MIL, t_oz * OZ_COPPER
        geom = Geometry((Layer(h_, d),), (Trace.centred(0.0, w_, h_, t),))
        eddy = eddy_impedance(geom, F, plane_thickness=OZ_COPPER, estimate=False)
        dims = {"width": w_, "height": h_, "thickness": t}
        z0 = FieldSection.from_model(Microstrip, dims, FieldOptions(d), Metal(), "normal")
        z0 = z0.modes(np.array([0.0]))["single"].z0[0]
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            ml = MLine(
                rf.Frequency.from_f(F, unit="Hz"),
                w=w_,
                h=h_,
                t=t,
                ep_r=DK,
                tand=0.0,
                rho=1 / 5.8e7,
                rough=0.0,
                model="hammerstadjensen",
                disp="none",
                diel="frequencyinvariant",
            )
            ours = Microstrip(w_, h_, t, d, Metal()).rlgc(F).r[:, 0, 0]
        alpha_eddy = eddy.r[:, 0, 0] / (2 * z0)
        ratio = np.real(ml.alpha_conductor) / alpha_eddy
        for i, fi in enumerate(F):
            print(
                f"| w {w:g} h {h:g} mil, {t_oz:g} oz | {fi / 1e9:g} | {ratio[i]:.3f} | "
                f"{ours[i] / eddy.r[i, 0, 0]:.3f} |"
            )


if __name__ == "__main__":
    main()
