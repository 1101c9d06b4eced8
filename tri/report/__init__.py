"""Renderers of engine results: JSON, terminal text, Markdown panel directory, CSV."""
