"""Plotly figures built from the sections of profile and drift documents.

Every builder is a pure function from a section (DESIGN.md field names) to a
figure dict ready for ``JSON.parse`` and ``Plotly.newPlot`` in the page, or
None when the section holds nothing to draw.
"""

from server.pages.figures.base import Figure, safe_text
from server.pages.figures.columns import (
    column_figure,
    datetime_figure,
    labels_figure,
    numeric_figure,
    whiskers,
)
from server.pages.figures.drift import (
    drift_column_figure,
    drift_labels_figure,
    drift_numeric_figure,
    drift_overview_figure,
)
from server.pages.figures.history import column_history_figure, timeline_figure
from server.pages.figures.missing import missing_figure, missing_parts, missing_together_figure
from server.pages.figures.relations import (
    correlation_figure,
    correlation_methods,
    crosstab_figure,
    crosstab_table,
)

__all__ = [
    "Figure",
    "column_figure",
    "column_history_figure",
    "correlation_figure",
    "correlation_methods",
    "crosstab_figure",
    "crosstab_table",
    "datetime_figure",
    "drift_column_figure",
    "drift_labels_figure",
    "drift_numeric_figure",
    "drift_overview_figure",
    "labels_figure",
    "missing_figure",
    "missing_parts",
    "missing_together_figure",
    "numeric_figure",
    "safe_text",
    "timeline_figure",
    "whiskers",
]
