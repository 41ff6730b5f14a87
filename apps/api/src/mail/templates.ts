import type { OutgoingMail } from './mailer';

export function invitationMail(p: { to: string; name: string; inviter: string; organisation: string; link: string; hours: number }): OutgoingMail {
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
