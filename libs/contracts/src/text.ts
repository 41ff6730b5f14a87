/** "The service limit" -> "the service limit", to use a field's name inside a sentence. */
export const lower = (what: string) => what.charAt(0).toLowerCase() + what.slice(1);
