"""Route files: schema, loading with positions, checks, domain objects and the route graph."""
