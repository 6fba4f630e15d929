"""The bench: trim advice and removal advice for undercut bars, one service for every front end."""

from cutplan.tuning.trim_service import (
    TrimError,
    TrimReading,
    TrimReport,
    parse_length_now,
    parse_measured,
    trim_reading,
    trim_report,
)

__all__ = ["TrimError", "TrimReading", "TrimReport", "parse_length_now", "parse_measured", "trim_reading",
           "trim_report"]
