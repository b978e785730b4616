-- Reserves core-seconds against an allocation in one call: locks the allocation row (FOR NO KEY UPDATE,
-- which serialises reservations but not the KEY SHARE locks of inserts referencing the allocation),
-- reads the balance in a statement of its own (a VOLATILE function takes a fresh snapshot per statement,
-- so it sees every reservation committed before the lock was granted), and inserts the reservation only
-- when it fits (a reservation of 0 only reads). Returns the balance before the reservation. One round
-- trip keeps the row locked for as short a time as possible: the lock is held until the caller's commit.
CREATE FUNCTION sigmaflow_reserve_core_seconds(p_allocation uuid, p_run uuid, p_core_seconds bigint)
RETURNS bigint LANGUAGE plpgsql VOLATILE AS $$
DECLARE
  v_granted bigint;
  v_available bigint;
BEGIN
  SELECT granted_core_seconds INTO v_granted FROM allocations WHERE id = p_allocation FOR NO KEY UPDATE;
  IF NOT FOUND THEN
    RAISE EXCEPTION 'allocation % does not exist', p_allocation USING ERRCODE = 'no_data_found';
  END IF;
  SELECT v_granted
         - coalesce(sum(core_seconds) FILTER (WHERE kind = 'reserve'), 0)
         + coalesce(sum(core_seconds) FILTER (WHERE kind = 'release'), 0)
         - coalesce(sum(core_seconds) FILTER (WHERE kind = 'charge'), 0)
    INTO v_available
    FROM ledger_entries WHERE allocation_id = p_allocation;
  IF p_core_seconds > 0 AND v_available >= p_core_seconds THEN
    INSERT INTO ledger_entries (allocation_id, run_id, kind, core_seconds)
    VALUES (p_allocation, p_run, 'reserve', p_core_seconds);
  END IF;
  RETURN v_available;
END
$$;
