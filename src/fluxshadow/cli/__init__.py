"""The command-line interface (thin typer app)."""
