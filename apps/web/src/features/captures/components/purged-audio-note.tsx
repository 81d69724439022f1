import { capturePurgedDetail } from '@earmark/contracts';
import { PanelCard } from './panel-card';

/** In place of the player: the retention policy removed this capture's audio (the verdict stays). */
export function PurgedAudioNote({ purgedAt }: { purgedAt: string }) {
  return (
    <PanelCard title="Listen">
      <p role="note" className="text-sm text-ink-700">
        {capturePurgedDetail(purgedAt)}
      </p>
    </PanelCard>
  );
}
