"""``python -m converter`` runs the gradeline command."""

from converter.cli import main

raise SystemExit(main())
