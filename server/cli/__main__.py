"""``python -m server.cli``: the same as the ``tidewaiter`` command."""

import sys

from server.cli import main

sys.exit(main())
