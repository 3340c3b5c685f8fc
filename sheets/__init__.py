"""PDF plan-and-profile sheets and plan-set tables (built on :mod:`converter`)."""

__all__: list[str] = []
