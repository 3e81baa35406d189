"""Star catalogues shipped with the app's dependencies, read into columnar Targets."""
