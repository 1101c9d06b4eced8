"""Pure numerical engine: no I/O, no UI imports, plain data in, frozen results out."""
