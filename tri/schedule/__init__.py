"""Panel schedules: typed immutable model, TOML loading with located errors, atomic saving."""
