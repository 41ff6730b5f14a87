// A process with the API's last-resort handlers, for process-guards.spec.ts:
//   reject: a promise nobody catches (logged; the process carries on and exits 0 by itself)
//   throw:  an exception thrown from a timer (logged as fatal; the process exits 1)
/* eslint-disable no-console -- process-guards.spec.ts reads this process's plain standard output */
import { createLogger } from '../logging';
import { installProcessGuards } from '../process-guards';

installProcessGuards(createLogger({ level: 'info', service: 'guard-test' }));
if (process.argv[2] === 'reject') {
  void Promise.reject(new Error('nobody caught me'));
  setTimeout(() => console.log('still serving'), 50);
} else {
  setTimeout(() => {
    throw new Error('thrown into the event loop');
  }, 10);
  setTimeout(() => console.log('still serving'), 500);
}
