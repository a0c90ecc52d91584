/**
 * An error the user can cause and fix (bad scenario, bad option, unknown
 * material ...). The message is one sentence naming the field and the fix.
 * The CLI prints it without a stack trace and exits with code 2.
 */
export class InputError extends Error {
    name = 'InputError';
    constructor(message) {
        super(message);
    }
}
