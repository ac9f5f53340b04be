"""``python -m tidewell``: the command line (see :mod:`tidewell.cli`)."""

from .cli import main

raise SystemExit(main())
