"""Solar-system bodies: the DE421 ephemeris, two-body orbits from elements, and the sources
(stars, major bodies, minor bodies) that give directions and distances for arrays of instants.

Importing this package is light: DE421 is read only when a body's position is first asked for.
"""
