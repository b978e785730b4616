// Remembers the group last opened so the landing page can return there. Storage may be unavailable
// (private windows, disabled storage): losing the preference is harmless.
const STORAGE_KEY = "sigmaflow.lastGroupId";

export function readLastGroupId(): string | null {
  try {
    return window.localStorage.getItem(STORAGE_KEY);
  } catch {
    return null;
  }
}

export function writeLastGroupId(groupId: string): void {
  try {
    window.localStorage.setItem(STORAGE_KEY, groupId);
  } catch {
    // Preference only.
  }
}
