"""Allow ``python -m tri``."""

from tri.cli import main

raise SystemExit(main())
