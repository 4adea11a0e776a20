"""Allow ``python -m domegen``."""

from domegen.cli.main import main

raise SystemExit(main())
