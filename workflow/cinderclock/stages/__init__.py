"""Stage functions: each takes a table and its settings and returns the next table and its rejects.

The workflow's rule scripts do the file I/O around these functions; :mod:`cinderclock.api` chains
them in memory.
"""
