"""Readers: files to plain records. The only code that reads files."""
