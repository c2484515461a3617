"""Physics kernels: pure numpy/scipy, SI units, no board types."""
