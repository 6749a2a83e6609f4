"""Dielectrics, conductors and copper roughness."""

from losslane.materials.conductor import COPPER, Conductor
from losslane.materials.dielectric import ConstantDielectric, Dielectric, WidebandDebye
from losslane.materials.roughness import (
    Graded,
    Groiss,
    Hammerstad,
    Huray,
    Roughness,
    Smooth,
)

__all__ = [
    "COPPER",
    "Conductor",
    "ConstantDielectric",
    "Dielectric",
    "WidebandDebye",
    "Graded",
    "Groiss",
    "Hammerstad",
    "Huray",
    "Roughness",
    "Smooth",
]
