"""Views: the one place that turns a Plan into rows, sentences and chart data."""
