"""Reports of a screened corridor: HTML, Markdown or CSV (``write_report``)."""

from screening.report.data import CAUTION, FORMATS, ReportData, build_report_data, write_report

__all__ = ["CAUTION", "FORMATS", "ReportData", "build_report_data", "write_report"]
