"""Renderings of a settings record: terminal table, PDF sheet, signatures. Layout only, no calculation."""
