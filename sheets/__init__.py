"""PDF plan-and-profile sheets and plan-set tables (built on :mod:`gradeline`)."""

__all__: list[str] = []
