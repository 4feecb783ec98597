from screening.cli import main

raise SystemExit(main())
