-- Search for the labour-time table and the parts catalogue. Full-text search finds words, codes
-- and synonyms; pg_trgm finds the nearest known words to a typo; btree_gin lets one GIN index
-- answer "this workshop's rows that match".
CREATE EXTENSION IF NOT EXISTS pg_trgm;
--> statement-breakpoint
CREATE EXTENSION IF NOT EXISTS btree_gin;
--> statement-breakpoint
-- Codes and part numbers compare on letters and digits only: "FA-SWS-L", "fa sws l" and "FASWSL" are one code.
CREATE FUNCTION catalogue_lookup_key(value text) RETURNS text
  LANGUAGE sql IMMUTABLE STRICT PARALLEL SAFE
  RETURN regexp_replace(upper(value), '[^A-Z0-9]', '', 'g');
--> statement-breakpoint
-- Names and synonyms are indexed twice: stemmed ('english', so "joints" finds "joint") and as
-- written ('simple', so the prefix "diff" finds "differential", which stems to "differenti").
-- Codes, names and synonyms weigh the same; notes count least.
CREATE FUNCTION labour_operations_search_fields() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  synonyms text := array_to_string(NEW.synonyms, ' ');
BEGIN
  NEW.lookup_key := catalogue_lookup_key(NEW.code);
  NEW.search_text := lower(concat_ws(' ', NEW.code, NEW.name, synonyms));
  NEW.search_vector :=
    setweight(to_tsvector('simple', NEW.code), 'A')
    || setweight(to_tsvector('english', NEW.name), 'A')
    || setweight(to_tsvector('simple', NEW.name), 'A')
    || setweight(to_tsvector('english', synonyms), 'A')
    || setweight(to_tsvector('simple', synonyms), 'A')
    || setweight(to_tsvector('english', coalesce(NEW.notes, '')), 'D');
  RETURN NEW;
END
$$;
--> statement-breakpoint
CREATE TRIGGER labour_operations_search_fields BEFORE INSERT OR UPDATE OF code, name, synonyms, notes ON labour_operations
  FOR EACH ROW EXECUTE FUNCTION labour_operations_search_fields();
--> statement-breakpoint
CREATE FUNCTION parts_search_fields() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  NEW.lookup_key := catalogue_lookup_key(NEW.part_number);
  NEW.search_text := lower(concat_ws(' ', NEW.part_number, NEW.description, NEW.supplier_ref));
  NEW.search_vector :=
    setweight(to_tsvector('simple', NEW.part_number), 'A')
    || setweight(to_tsvector('simple', coalesce(NEW.supplier_ref, '')), 'A')
    || setweight(to_tsvector('english', NEW.description), 'A')
    || setweight(to_tsvector('simple', NEW.description), 'A');
  RETURN NEW;
END
$$;
--> statement-breakpoint
CREATE TRIGGER parts_search_fields BEFORE INSERT OR UPDATE OF part_number, description, supplier_ref ON parts
  FOR EACH ROW EXECUTE FUNCTION parts_search_fields();
--> statement-breakpoint
-- Once per statement, so an import of thousands of rows collects its words in one pass. Words are
-- only added: one left behind by an edit can only offer a correction that then matches nothing.
CREATE FUNCTION catalogue_collect_words() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO catalogue_words (workshop_id, source, word)
  SELECT DISTINCT r.workshop_id, TG_ARGV[0]::catalogue_word_source, w
  FROM changed_rows r, regexp_split_to_table(r.search_text, '[^[:alnum:]]+') AS w
  WHERE length(w) >= 3 AND w ~ '[[:alpha:]]'
  ON CONFLICT DO NOTHING;
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER labour_operations_words_inserted AFTER INSERT ON labour_operations
  REFERENCING NEW TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION catalogue_collect_words('labour');
--> statement-breakpoint
CREATE TRIGGER labour_operations_words_updated AFTER UPDATE ON labour_operations
  REFERENCING NEW TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION catalogue_collect_words('labour');
--> statement-breakpoint
CREATE TRIGGER parts_words_inserted AFTER INSERT ON parts
  REFERENCING NEW TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION catalogue_collect_words('parts');
--> statement-breakpoint
CREATE TRIGGER parts_words_updated AFTER UPDATE ON parts
  REFERENCING NEW TABLE AS changed_rows FOR EACH STATEMENT EXECUTE FUNCTION catalogue_collect_words('parts');
--> statement-breakpoint
CREATE INDEX labour_operations_search ON labour_operations USING gin (workshop_id, search_vector);
--> statement-breakpoint
CREATE INDEX labour_operations_lookup_key ON labour_operations (workshop_id, lookup_key text_pattern_ops);
--> statement-breakpoint
CREATE INDEX parts_search ON parts USING gin (workshop_id, search_vector);
--> statement-breakpoint
CREATE INDEX parts_lookup_key ON parts (workshop_id, lookup_key text_pattern_ops);
--> statement-breakpoint
CREATE INDEX catalogue_words_trgm ON catalogue_words USING gin (workshop_id, source, word gin_trgm_ops);
