from sheetgen.cli import main

main()
