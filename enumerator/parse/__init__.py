"""Formula readers: the abstract letter notation and condensed real formulas."""
