import type { OutgoingMail } from './mailer';

/** A link in a mail: the address (built for its recipient) and the words before it. */
export interface MailLink {
  label: string;
  url: string;
}

export function invitationMail(p: {
  to: string;
  name: string;
  inviter: string;
  organisation: string;
  link: string;
  hours: number;
}): OutgoingMail {
  return {
    to: p.to,
    subject: `You are invited to Nightyard (${p.organisation})`,
    text: [
      `Hello ${p.name},`,
      '',
      `${p.inviter} invited you to Nightyard for ${p.organisation}. Choose a password here:`,
      '',
      p.link,
      '',
      `The link works once and expires in ${p.hours} hours. If you did not expect this, ignore this message.`,
    ].join('\n'),
  };
}

export function resetMail(p: { to: string; name: string; link: string; minutes: number }): OutgoingMail {
  return {
    to: p.to,
    subject: 'Reset your Nightyard password',
    text: [
      `Hello ${p.name},`,
      '',
      'Someone asked to reset the password of this Nightyard account. To choose a new one, open:',
      '',
      p.link,
      '',
      `The link works once and expires in ${p.minutes} minutes. If it was not you, ignore this message: your password stays as it is.`,
    ].join('\n'),
  };
}

export function planPublishedMail(p: {
  to: string;
  name: string;
  depot: string;
  night: string;
  version: number;
  publishedBy: string;
  buses: number;
  sessions: number;
  currency: string;
  cost: number;
  /** The plan's charging energy, and the cheaper baseline's (its shortfall valued in), as the review compares them. */
  energy: number;
  baseline: number;
  baselineName: string;
  short: string[];
  /** The published version this plan kept wherever it fits, and the buses whose charging differs from it. */
  changed?: { version: number; buses: string[]; lines?: string[] };
  link: MailLink;
}): OutgoingMail {
  const money = (v: number) => new Intl.NumberFormat('en-US', { style: 'currency', currency: p.currency }).format(v);
  const n = p.changed?.buses.length ?? 0;
  return {
    to: p.to,
    subject: `Charging plan published: ${p.depot}, night of ${p.night} (version ${p.version})`,
    text: [
      `Hello ${p.name},`,
      '',
      `${p.publishedBy} published version ${p.version} of the charging plan for ${p.depot}, the night of ${p.night}.`,
      '',
      ...(p.changed
        ? [
            n
              ? `Against version ${p.changed.version}: ${n} ${n === 1 ? 'bus changes' : 'buses change'} charger or times (${p.changed.buses.join(', ')})${n < p.buses ? '; every other bus keeps its charger and times' : ''}.`
              : `Against version ${p.changed.version}: no bus changes charger or times.`,
            ...(p.changed.lines ?? []).map((l) => `- ${l}`),
            '',
          ]
        : []),
      `Buses: ${p.buses}; plug-ins: ${p.sessions}.`,
      `Projected electricity cost: ${money(p.cost)}. Charging energy: ${money(p.energy)} (${p.baselineName.toLowerCase()}, within the same limits: ${money(p.baseline)}).`,
      p.short.length
        ? `Buses that cannot be fully charged: ${p.short.join('; ')}.`
        : 'Every bus gets the energy its runs need.',
      '',
      `${p.link.label}: ${p.link.url}`,
      '',
      'The plan is advisory: the people on site decide. Only trained and authorised staff connect or disconnect chargers.',
    ].join('\n'),
  };
}

export function planRevisedMail(p: {
  to: string;
  name: string;
  depot: string;
  version: number;
  at: string;
  reportedBy: string;
  what: string;
  moved: string[];
  /** The yard's steps due in the next hour, as the yard page words them ("23:07 Unplug bus 218 ..."). */
  steps?: string[];
  link: MailLink;
  /** How many buses the re-plan moved and why, in words (the engine's reasons). */
  why?: { buses: number; reasons: string[] };
  /** What the revision does to the night's cost and which buses it leaves short, in words. */
  effect?: string[];
}): OutgoingMail {
  return {
    to: p.to,
    subject: `Plan revised at ${p.at}: ${p.depot} (version ${p.version})`,
    text: [
      `Hello ${p.name},`,
      '',
      `${p.reportedBy} reported ${p.what}. The rest of the night was planned again and published as version ${p.version}.`,
      '',
      p.moved.length ? `Changed: ${p.moved.join('; ')}.` : 'No bus changed charger or times.',
      '',
      ...(p.why && p.why.reasons.length
        ? [
            `${p.why.buses} ${p.why.buses === 1 ? 'bus' : 'buses'} moved from ${p.at} on, because: ${p.why.reasons.join('; ')}.`,
            '',
          ]
        : []),
      ...(p.effect?.length ? [...p.effect, ''] : []),
      ...(p.steps?.length ? ['Steps in the next hour:', ...p.steps.map((s) => `- ${s}`), ''] : []),
      `${p.link.label}: ${p.link.url}`,
      '',
      'The plan is advisory: the people on site decide. Only trained and authorised staff connect or disconnect chargers.',
    ].join('\n'),
  };
}
