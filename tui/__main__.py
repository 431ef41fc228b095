from tui.cli.main import main

raise SystemExit(main())
