"""Judgements on solved geometry: design-control review, cross-check, fit of drawn profiles."""
