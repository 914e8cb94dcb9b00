"""``python -m stillair.data``: write the shipped gas property tables again (gas_tables.npz).

The same as ``python -m stillair.gases --rebuild-tables``.  Options: ``--output PATH``.
"""

import sys

from stillair.gases import main

sys.exit(main(["--rebuild-tables", *sys.argv[1:]]))
