-- Plan bodies are stored compressed by the store (S2, planbody.go): where the
-- engine would compress large values again, it is told not to
-- (PostgreSQL: SET STORAGE EXTERNAL keeps them out of line, uncompressed).
-- Rows written before keep the form they were written in.
{{.PlanBodyStorage}}
