from .views.cli import main

raise SystemExit(main())
