/**
 * Keeps an editor that owns its text (CodeMirror) in step with the page's copy of that text. The page
 * hands back what the editor sent, sometimes a keystroke or more behind what the editor already shows;
 * such an echo must never overwrite the editor, while a text set elsewhere (a restored draft, discarded
 * edits) must.
 */
export class TypedTextEcho {
  private sent: string[] = [];
  private received: string;

  /** `initial` is the text the editor was created with. */
  constructor(
    initial: string,
    private readonly kept = 64,
  ) {
    this.received = initial;
  }

  /** Records a text the editor sends up to the page. */
  send(text: string): void {
    this.sent = [...this.sent.slice(-(this.kept - 1)), text];
  }

  /** Given the page's text and the editor's own, says whether the page's text replaces the editor's. */
  replaces(text: string, shown: string): boolean {
    // Texts come back in the order they were sent; one seen back settles it and every earlier one.
    const echoed = this.sent.indexOf(text);
    if (echoed >= 0) this.sent = this.sent.slice(echoed + 1);
    const fromElsewhere = text !== this.received && echoed < 0 && text !== shown;
    this.received = text;
    if (fromElsewhere) this.sent = [];
    return fromElsewhere;
  }
}
