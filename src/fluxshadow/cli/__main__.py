"""``python -m fluxshadow.cli``."""

from fluxshadow.cli.app import main

main()
