from screen.cli.main import main

if __name__ == "__main__":  # pragma: no cover
    main()
