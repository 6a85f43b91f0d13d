import { ncrStatuses } from '@shared/schemas/ncrs';

// How a refused NCR write reads on the page. The server's message is a sentence for people; its details
// repeat parts of it for programs: the states a refused step may go to (`to`), each thing that keeps an NCR
// from closing (`closing`), or a refused field. The page shows the sentence's lead and each point once.

export interface Refusal {
  lead: string;
  points: string[];
}

export function readRefusal(message: string, details: readonly { path: string; message: string }[]): Refusal {
  const closing = details.filter((d) => d.path === 'closing').map((d) => d.message);
  if (closing.length > 0) {
    const colon = message.indexOf(':');
    return { lead: colon > 0 ? `${message.slice(0, colon)}:` : message, points: closing };
  }
  const states = details.filter((d) => d.path === 'to' && (ncrStatuses as readonly string[]).includes(d.message));
  if (states.length > 0) return { lead: message, points: [] };
  return { lead: message, points: details.map((d) => d.message).filter((m) => !message.includes(m)) };
}
