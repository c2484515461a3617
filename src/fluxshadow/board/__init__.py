"""Board model: layered copper, spatial index, magnetics, registration."""
