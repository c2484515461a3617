"""``python -m fluxshadow``."""

from fluxshadow.cli.app import main

main()
