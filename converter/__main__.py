"""``python -m gradeline`` runs the gradeline command."""

from gradeline.cli import main

raise SystemExit(main())
