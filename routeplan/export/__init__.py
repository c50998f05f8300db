"""Writers that read a Plan and never recompute it: tables, JSON, workbook, terminal."""
