import { Button } from "@/components/ui/button";
import { useFollowState, useSetFollow } from "../api/releases";

/** Follow a dataset to hear (by e-mail and in Tauline) about its new releases and retractions. */
export function FollowButton({ datasetId, signedIn }: { datasetId: string; signedIn: boolean }) {
  const state = useFollowState(datasetId, signedIn);
  const set = useSetFollow(datasetId);
  if (!signedIn || !state.data) return null;
  const following = state.data.following;
  return (
    <Button variant="secondary" aria-pressed={following} busy={set.isPending} disabled={set.isPending} onClick={() => set.mutate(!following)}>
      {following ? "Following releases ✓" : "Follow releases"}
    </Button>
  );
}
