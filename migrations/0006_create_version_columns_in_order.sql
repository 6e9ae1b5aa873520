-- The columns of a version in file order with their names, readable from this index alone:
-- listing a version's columns (which every load does) then no longer reads the column rows,
-- each of which holds the whole JSON text of its observations.
CREATE INDEX version_columns_in_order ON version_columns (version_id, position, column_name);
