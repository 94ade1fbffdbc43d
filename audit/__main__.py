"""``python -m audit`` is the same as the ``vpaudit`` command."""

import sys

from .cli import main

sys.exit(main())
