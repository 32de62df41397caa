"""Formatting for every shell: text, Markdown, JSON (and HTML reports)."""
