"""Drive: involute tooth geometry, gear blanks and the meshing pair."""
