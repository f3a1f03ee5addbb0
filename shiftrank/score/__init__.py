"""Stages 4 and 5, matching and scoring: observed peaks ↔ a candidate's symmetry classes, costs,
probabilities across candidates, what separates the best two (:mod:`.separation`), batches; and a sample's lines against a reference spectrum
(:mod:`.reference`).  May call every stage before it; never prints."""
