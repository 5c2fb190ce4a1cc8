"""The short high-voltage caution carried by the README, the About box and every report.

One constant, so every place that shows it says the same thing.  The README quotes it
word for word; ``tests/app/test_report.py`` checks that the README, the PDF and the
figures carry it.
"""

from __future__ import annotations

CAUTION_TITLE = "High voltage can kill."

CAUTION = (
    "High voltage can kill. Results are estimates for design guidance; real breakdown "
    "depends on surface condition, humidity, pressure, contamination and 3D effects. "
    "Follow local codes and licensed practice."
)
"""The caution text: one paragraph, plain ASCII, no line breaks (callers wrap it)."""
