"""Eigensolvers: batched dense diagonalisation streamed over k-chunks."""

from valband.solve.eigen import DEFAULT_CHUNK_BYTES, diagonalise

__all__ = ["diagonalise", "DEFAULT_CHUNK_BYTES"]
