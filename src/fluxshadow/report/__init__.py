"""Reporters: pure functions of a report."""
