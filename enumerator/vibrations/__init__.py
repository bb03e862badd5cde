"""Band model: force field, GF solver, fitting and matching of measured bands."""
