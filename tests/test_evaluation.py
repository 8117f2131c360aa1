"""Calibration error and per-category accuracy.

References: ``sklearn.calibration.calibration_curve`` (uniform strategy) gives each
non-empty bin's accuracy and mean confidence; ECE is their gap weighted by the bin's share
(Naeini, Cooper & Hauskrecht 2015), recomputed here from those scikit-learn outputs.
``sklearn.metrics.recall_score(average=None)`` is per-category accuracy.
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from sklearn.calibration import calibration_curve
from sklearn.metrics import recall_score

from seedsort.evaluation import expected_calibration_error, per_category_accuracy


@settings(max_examples=60, deadline=None)
@given(st.integers(min_value=0, max_value=2**31 - 1), st.integers(min_value=5, max_value=400))
def test_ece_matches_calibration_curve(seed: int, m: int) -> None:
    rng = np.random.default_rng(seed)
    confidence = rng.uniform(0.0, 0.999, m)
    correct = rng.uniform(size=m) < confidence ** 0.7
    bins = 15
    # Reference: scikit-learn's bin accuracies and mean confidences, weighted by bin share.
    prob_true, prob_pred = calibration_curve(correct, confidence, n_bins=bins, strategy="uniform")
    which = np.minimum((confidence * bins).astype(int), bins - 1)
    shares = np.bincount(which, minlength=bins) / m
    reference = float(np.sum(shares[shares > 0] * np.abs(prob_true - prob_pred)))
    assert abs(expected_calibration_error(confidence, correct, bins) - reference) < 1e-9


def test_perfectly_calibrated_bins_have_zero_error() -> None:
    """By the definition: in every bin, accuracy equals mean confidence."""
    confidence = np.array([0.25] * 4 + [0.75] * 4)
    correct = np.array([1, 0, 0, 0, 1, 1, 1, 0], dtype=bool)
    assert expected_calibration_error(confidence, correct) == 0.0


def test_per_category_accuracy_is_recall() -> None:
    rng = np.random.default_rng(3)
    true = rng.integers(0, 4, 200)
    predicted = np.where(rng.uniform(size=200) < 0.7, true, rng.integers(0, 4, 200))
    np.testing.assert_allclose(per_category_accuracy(true, predicted, 4), recall_score(true, predicted, average=None))
    assert np.isnan(per_category_accuracy(true, predicted, 5)[4])
