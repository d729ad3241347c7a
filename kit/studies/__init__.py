"""Studies: one module per scenario kind, each with ``compute(scenario) -> Results``."""
