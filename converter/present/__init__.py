"""Presentation records: label text, drawing roles and layout, drafting items, table rows.

Nothing here imports numpy at package level, so the command line can read the
role names without loading the computation stack.
"""
