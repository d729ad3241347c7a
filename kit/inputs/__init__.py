"""The schema room: one module per scenario kind reads a scenario into typed SI inputs and
writes typed inputs back to text. Nothing else reads or writes scenario keys."""
