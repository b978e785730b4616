import { useEffect } from "react";
import { Outlet, useParams } from "react-router-dom";
import { writeLastGroupId } from "@/lib/last-group";

/** Wraps every page of one group; remembers the group for the next visit's landing page. */
export function GroupLayout() {
  const { groupId } = useParams();
  useEffect(() => {
    if (groupId) writeLastGroupId(groupId);
  }, [groupId]);
  return <Outlet />;
}
