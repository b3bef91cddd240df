"""MkDocs plugin: calculator blocks in Markdown, answered at build time and
live in the page through Pyodide, offline after one visit."""
