"""Substitution routes: canonical keys, the formula space, step prediction,
the network and the planner."""
