import { formatUtcOffset, type Site } from "@/features/sites/schemas";

function Row({ term, children, note }: { term: string; children: React.ReactNode; note?: string }) {
  return (
    <div className="grid grid-cols-[minmax(0,11rem)_1fr] gap-3 border-b border-line py-3 last:border-0">
      <dt className="text-sm text-ink-muted">{term}</dt>
      <dd className="text-sm text-ink">
        <span className="font-mono">{children}</span>
        {note ? <span className="ml-2 text-xs text-ink-muted">{note}</span> : null}
      </dd>
    </div>
  );
}

/** A site's metadata as a definition list. */
export function SiteFacts({ site }: { site: Site }) {
  const d = site.displacementHeightM;
  return (
    <dl>
      <Row term="Latitude">{site.latitude}°</Row>
      <Row term="Longitude">{site.longitude}°</Row>
      <Row term="Elevation">{site.elevationM} m</Row>
      <Row term="Measurement height">{site.measurementHeightM} m</Row>
      <Row term="Canopy height">{site.canopyHeightM} m</Row>
      <Row term="Displacement height" note={d === null ? "not set: ⅔ of canopy height assumed" : undefined}>
        {d === null ? `${Math.round((2 / 3) * site.canopyHeightM * 100) / 100} m` : `${d} m`}
      </Row>
      <Row term="Data clock" note="standard time">
        {formatUtcOffset(site.utcOffsetHours)}
      </Row>
    </dl>
  );
}
