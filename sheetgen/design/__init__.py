"""Design: the typed parameters, the layout solver, the part model, the part families and the kit."""
