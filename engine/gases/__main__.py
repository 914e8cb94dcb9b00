"""``python -m stillair.gases --rebuild-tables [--output PATH]`` (also ``python -m stillair.data``)."""

import sys

from stillair.gases import main

sys.exit(main())
