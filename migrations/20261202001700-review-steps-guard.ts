import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// The review steps in SQL, for every database user (the app's role included): a revision is created as
// 'submitted', and its state changes only from 'submitted' to the state its decision row says (approve →
// approved, request-changes → changes-requested). Approved revisions stay immutable and content stays frozen.
const GUARD = `
CREATE OR REPLACE FUNCTION revisions_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    IF NEW.state <> 'submitted' THEN
      RAISE EXCEPTION 'a revision starts as submitted, not %', NEW.state USING ERRCODE = 'check_violation';
    END IF;
    RETURN NEW;
  END IF;
  IF TG_OP = 'DELETE' THEN
    IF OLD.state = 'approved' THEN
      RAISE EXCEPTION 'approved revision % is immutable', OLD.id USING ERRCODE = 'check_violation';
    END IF;
    RETURN OLD;
  END IF;
  IF OLD.state = 'approved' THEN
    RAISE EXCEPTION 'approved revision % is immutable', OLD.id USING ERRCODE = 'check_violation';
  END IF;
  IF NEW.snapshot IS DISTINCT FROM OLD.snapshot OR NEW.content_hash IS DISTINCT FROM OLD.content_hash
     OR NEW.project_id IS DISTINCT FROM OLD.project_id OR NEW.number IS DISTINCT FROM OLD.number
     OR NEW.submitted_by_id IS DISTINCT FROM OLD.submitted_by_id THEN
    RAISE EXCEPTION 'revision % content is frozen', OLD.id USING ERRCODE = 'check_violation';
  END IF;
  IF NEW.state IS DISTINCT FROM OLD.state THEN
    IF OLD.state <> 'submitted' OR NOT EXISTS (
      SELECT 1 FROM decisions d WHERE d.revision_id = NEW.id
         AND ((d.decision = 'approve' AND NEW.state = 'approved') OR (d.decision = 'request-changes' AND NEW.state = 'changes-requested'))
    ) THEN
      RAISE EXCEPTION 'revision % cannot go from % to % without the review decision for it', OLD.id, OLD.state, NEW.state USING ERRCODE = 'check_violation';
    END IF;
  END IF;
  RETURN NEW;
END $$;
DROP TRIGGER IF EXISTS revisions_guard ON revisions;
CREATE TRIGGER revisions_guard BEFORE INSERT OR UPDATE OR DELETE ON revisions FOR EACH ROW EXECUTE FUNCTION revisions_guard();
`;

const PREVIOUS = `
CREATE OR REPLACE FUNCTION revisions_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    IF OLD.state = 'approved' THEN
      RAISE EXCEPTION 'approved revision % is immutable', OLD.id USING ERRCODE = 'check_violation';
    END IF;
    RETURN OLD;
  END IF;
  IF OLD.state = 'approved' THEN
    RAISE EXCEPTION 'approved revision % is immutable', OLD.id USING ERRCODE = 'check_violation';
  END IF;
  IF NEW.snapshot IS DISTINCT FROM OLD.snapshot OR NEW.content_hash IS DISTINCT FROM OLD.content_hash
     OR NEW.project_id IS DISTINCT FROM OLD.project_id OR NEW.number IS DISTINCT FROM OLD.number
     OR NEW.submitted_by_id IS DISTINCT FROM OLD.submitted_by_id THEN
    RAISE EXCEPTION 'revision % content is frozen', OLD.id USING ERRCODE = 'check_violation';
  END IF;
  RETURN NEW;
END $$;
DROP TRIGGER IF EXISTS revisions_guard ON revisions;
CREATE TRIGGER revisions_guard BEFORE UPDATE OR DELETE ON revisions FOR EACH ROW EXECUTE FUNCTION revisions_guard();
`;

export async function up({ context: qi }: Ctx) {
  await qi.sequelize.query(GUARD);
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.query(PREVIOUS);
}
