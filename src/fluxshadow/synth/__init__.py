"""Synthetic fabrication packages: a writer for Gerber X2, Excellon, placement and job files.

Used for the bundled fixtures and the synthetic test boards, each built from a
:class:`~fluxshadow.synth.model.SynthBoard` description whose expected geometry is known.
"""
