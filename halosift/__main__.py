import sys

from halosift.cli import main

sys.exit(main())
