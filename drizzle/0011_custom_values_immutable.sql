-- Custom SQL migration file, put your code below! --
-- The values of a curator's own dictionary fields are data of their version: as immutable as its plots once published.
CREATE TRIGGER custom_values_guard_insert AFTER INSERT ON custom_values REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER custom_values_guard_update_old AFTER UPDATE ON custom_values REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER custom_values_guard_update_new AFTER UPDATE ON custom_values REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER custom_values_guard_delete AFTER DELETE ON custom_values REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER custom_values_guard_truncate BEFORE TRUNCATE ON custom_values FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
