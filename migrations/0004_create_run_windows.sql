-- The rolling estimates of every run, one row per window end, read from runs.result_json:
-- runs are immutable and hash-chained, so the windows are not stored twice.
CREATE VIEW run_windows AS
SELECT r.run_id,
       json_extract(w.value, '$.end') AS window_end,
       json_extract(w.value, '$.first') AS window_first,
       json_extract(w.value, '$.observations') AS observations,
       json_extract(w.value, '$.lags') AS lags,
       json_extract(w.value, '$.alpha') AS alpha,
       json_extract(w.value, '$.alpha_std_error') AS alpha_std_error,
       json_extract(w.value, '$.alpha_ci_low') AS alpha_ci_low,
       json_extract(w.value, '$.alpha_ci_high') AS alpha_ci_high,
       json_extract(w.value, '$.alpha_annualized') AS alpha_annualized,
       json_extract(w.value, '$.alpha_annualized_ci_low') AS alpha_annualized_ci_low,
       json_extract(w.value, '$.alpha_annualized_ci_high') AS alpha_annualized_ci_high,
       json_extract(w.value, '$.beta') AS beta,
       json_extract(w.value, '$.beta_std_error') AS beta_std_error,
       json_extract(w.value, '$.beta_ci_low') AS beta_ci_low,
       json_extract(w.value, '$.beta_ci_high') AS beta_ci_high
FROM runs AS r, json_each(r.result_json, '$.rolling.windows') AS w
WHERE w.type = 'object';
