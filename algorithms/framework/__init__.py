"""Shared by every algorithm: base class, shared parameters, run ledger, help loader."""
