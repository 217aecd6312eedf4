import sys

from plantside.cli.main import main

sys.exit(main())
