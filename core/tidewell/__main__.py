"""``python -m tidewell``: the command line (see :mod:`tidewell.frontends.cli`)."""

from .frontends.cli import main

raise SystemExit(main())
