from regentime.cli import main

raise SystemExit(main())
