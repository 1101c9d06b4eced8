"""tri: balance three-phase distribution panels.

Layers (each imports only the ones before it):
``tri.engine`` (pure numpy) -> ``tri.schedule`` (model and TOML files) ->
``tri.report`` (renderers) -> ``tri.cli`` (commands) -> ``tri.tui`` (terminal UI).
"""

__version__ = "0.1.0"
