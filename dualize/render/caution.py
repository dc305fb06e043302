"""The caution every report carries: what a dual bound or certificate does and does not say."""

from __future__ import annotations

REVIEW = ("It does not replace review under the applicable codes and licensed "
          "professional practice.")

CAUTION = ("A dual bound or strong-duality certificate holds for the model as written and "
           "within solver tolerances. " + REVIEW)
