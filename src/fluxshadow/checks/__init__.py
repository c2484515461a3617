"""Rules that turn a board and physics into findings."""
