"""Physics kernels: pure numpy/scipy, SI units, no board types.

Arrays in, arrays out; lengths in metres, frequencies in hertz, currents in amperes, fields
in teslas. No input checking beyond what the formulas need: the caller validates.

Modules
-------
constants
    μ0, ε0, c0 and copper's resistivity / conductivity.
skin
    Skin depth and the propagation constant γ = √(k² + jωμσ).
loop
    Circular filament loops in free space (field, vector potential, flux, Maxwell's mutual
    inductance, image ΔL, ring self-inductance, dipole), in the loop frame or in any
    position and orientation.
slab
    Planes in the spectral domain: slab and stack transmission T(k) / reflection R(k),
    thin-sheet model, Hankel-transform fields below planes for vertical loops and dipoles,
    ΔL / ΔR of a winding over planes, classic shielding numbers for comparison.
spectral
    Any source below planes through a 2D FFT of its incident B_z.
victim
    Mutual inductance of loops with a trace and its return path, shielded or not; EMF.
buck
    Buck-stage duty, ripple, current slopes and ripple harmonics.
capacitance
    Pad-to-plane capacitance (parallel plate, Palmer, microstrip), CV²f loss, C dV/dt.
mesh
    Graded triangle meshes of plane copper (polygons with holes) for the sheet solver.
sheet
    Thin-sheet eddy-current solver on a triangle mesh: stream function, one ring-current
    unknown per enclosed hole, several planes coupled, frequency sweeps from one reduction.

Every formula's source is named in its function's ``References`` section, with the label
the fluxshadow physics reference gives it (verified / exists / from memory / derived).
"""
