-- Views that answer common questions without joins.
CREATE VIEW run_summary AS
SELECT r.run_id, r.created_at, r.strategy, r.benchmark, r.rate, r.factors, r.study, r.note,
       r.frequency, r.first_period, r.last_period, r.observations, r.dropped_periods,
       r.errors, r.lags, r.alpha, r.alpha_std_error, r.alpha_t, r.alpha_p,
       r.alpha_annualized, r.beta, r.beta_t, r.r_squared, r.revises_run_id, r.inputs_hash,
       EXISTS (SELECT 1 FROM run_inputs AS i
               JOIN series_versions AS v ON v.version_id = i.version_id
               JOIN series_versions AS w ON w.series_id = v.series_id AND w.version > v.version
               WHERE i.run_id = r.run_id) AS stale
FROM runs AS r;

CREATE VIEW latest_versions AS
SELECT s.name, s.kind, v.version, v.version_id, v.content_hash, v.unit, v.input_unit, v.quote,
       v.frequency, v.first_date, v.last_date, v.observations, v.missing, v.source_file,
       v.ingested_at, v.ingested_by, v.note
FROM series AS s
JOIN series_versions AS v ON v.series_id = s.series_id
WHERE v.version = (SELECT max(w.version) FROM series_versions AS w WHERE w.series_id = s.series_id);

CREATE VIEW run_input_versions AS
SELECT i.run_id, i.role, i.position, s.name AS series, v.version, v.content_hash, i.columns,
       (SELECT max(w.version) FROM series_versions AS w WHERE w.series_id = v.series_id) AS latest_version,
       v.source_file, v.note
FROM run_inputs AS i
JOIN series_versions AS v ON v.version_id = i.version_id
JOIN series AS s ON s.series_id = v.series_id;
