"""Outputs: tables, plots and reports."""
