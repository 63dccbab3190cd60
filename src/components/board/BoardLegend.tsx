/** The key to the board's colours and hatching. */
export function BoardLegend() {
  return (
    <section className="side-card legend" aria-labelledby="legend-h">
      <h3 id="legend-h">Key</h3>
      <ul className="text-sm">
        <li>
          <span className="key key-window" /> ready window of a run's wash (10–90 %)
        </li>
        <li>
          <span className="key key-before" /> run starts before its wash is ready
        </li>
        <li>
          <span className="key key-inside" /> run starts inside the window
        </li>
        <li>
          <span className="key key-after" /> run starts after the window
        </li>
        <li>
          <span className="key key-clean" /> cleaning after a run
        </li>
        <li>
          <span className="key key-closed" /> still closed
        </li>
        <li>
          <span className="key" style={{ border: '2px dashed var(--color-haze)', background: 'rgba(107, 122, 118, 0.08)' }} /> a started run's booking (the run
          itself is drawn where it really ran)
        </li>
      </ul>
    </section>
  );
}
