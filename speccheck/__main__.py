from speccheck.cli import main

main()
