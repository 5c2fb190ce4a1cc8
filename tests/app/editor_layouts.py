"""Small invented layouts the editor tests share (demo data, not reference values)."""

from __future__ import annotations

from solver.layout import (
    Boundary,
    Circle,
    Ellipse,
    Layout,
    Part,
    Path,
    PeekLimit,
    Polygon,
    Rect,
)


def every_shape_layout() -> Layout:
    """One part of every shape kind, well apart, plus a grounded box boundary."""
    return Layout(
        title="Editor test bench",
        boundary=Boundary(type="box", min=(-200.0, -200.0), max=(200.0, 200.0), volts=0.0),
        limit=PeekLimit(pressure_kPa=90.0, temperature_C=25.0, surface_factor=0.8),
        resolution=0.5,
        parts=(
            Part("Bar", "electrode", Rect((-40.0, -10.0), (-20.0, 10.0), 2.0), volts=5000.0),
            Part("Ball", "floating", Circle((30.0, 0.0), 6.0), charge=0.0),
            Part("Lens", "dielectric", Ellipse((0.0, 60.0), (15.0, 5.0), 20.0),
                 permittivity=3.5),
            Part("Plate", "electrode",
                 Polygon(((-60.0, -80.0), (60.0, -80.0), (60.0, -60.0), (-60.0, -60.0)),
                         holes=(((-10.0, -75.0), (10.0, -75.0), (10.0, -65.0),
                                 (-10.0, -65.0)),),
                         corner_radius=(1.0, 1.0, 0.0, 0.0)), volts=0.0),
            Part("Lead", "electrode", Path(((80.0, 0.0), (100.0, 20.0), (120.0, 20.0)), 2.0),
                 volts=5000.0),
        ),
    )
