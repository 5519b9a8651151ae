/** The framed-panel look shared by the admin, profile and API pages (component styles). */
export const PANEL_STYLES = `
  .panel {
    border: 1px solid var(--mat-sys-outline-variant);
    border-radius: 16px;
    overflow: hidden;
    background: var(--mat-sys-surface-container-lowest);
    margin-bottom: 20px;
  }
  .panel-head {
    display: flex;
    align-items: center;
    gap: 10px;
    padding: 16px 20px;
    flex-wrap: wrap;
  }
  .panel-head h2 {
    margin: 0;
    font: var(--mat-sys-title-medium);
    flex: 1;
  }
  .panel-body {
    padding: 0 20px 16px;
  }
  .hint {
    color: var(--mat-sys-on-surface-variant);
    font: var(--mat-sys-body-small);
    margin: 0 0 12px;
  }
  .row {
    display: flex;
    gap: 12px;
    flex-wrap: wrap;
    align-items: baseline;
  }
  .mono {
    font-family: 'Roboto Mono', monospace;
    font-size: 13px;
  }
  .full {
    width: 100%;
  }
  table {
    width: 100%;
  }
`;
