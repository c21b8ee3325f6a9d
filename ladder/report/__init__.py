"""The month-end report: accounting figures, the activity journal, the history and the report files."""
