"""``python -m stillair.data``: write the shipped gas property tables again (gas_tables.npz).

The same as ``python -m stillair.gases --rebuild-tables`` without runpy's warning about running a
module the engine package has already imported.  Options: ``--output PATH``.
"""

import sys

from stillair.gases import main

sys.exit(main(["--rebuild-tables", *sys.argv[1:]]))
