from knockproof.cli.app import main

main()
