-- Published outlooks are unchangeable: rows of outlook_versions and outlook_version_farms are never
-- updated, and deleted only by a full reset that sets `netput.purge_outlooks = 'on'` in its own
-- transaction (see purgeOutlookData in server/outlook/outlook-repository.ts).
CREATE FUNCTION netput_refuse_outlook_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP IN ('DELETE', 'TRUNCATE') AND coalesce(current_setting('netput.purge_outlooks', true), '') = 'on' THEN
    IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
    RETURN NULL;
  END IF;
  RAISE EXCEPTION 'A published outlook cannot be changed (% on %); publish a new version instead', TG_OP, TG_TABLE_NAME
    USING ERRCODE = 'P0001';
END $$;
--> statement-breakpoint
CREATE TRIGGER outlook_versions_immutable BEFORE UPDATE OR DELETE ON outlook_versions
  FOR EACH ROW EXECUTE FUNCTION netput_refuse_outlook_change();
--> statement-breakpoint
CREATE TRIGGER outlook_versions_no_truncate BEFORE TRUNCATE ON outlook_versions
  FOR EACH STATEMENT EXECUTE FUNCTION netput_refuse_outlook_change();
--> statement-breakpoint
CREATE TRIGGER outlook_version_farms_immutable BEFORE UPDATE OR DELETE ON outlook_version_farms
  FOR EACH ROW EXECUTE FUNCTION netput_refuse_outlook_change();
--> statement-breakpoint
CREATE TRIGGER outlook_version_farms_no_truncate BEFORE TRUNCATE ON outlook_version_farms
  FOR EACH STATEMENT EXECUTE FUNCTION netput_refuse_outlook_change();
