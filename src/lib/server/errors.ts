/** A refusal the person can act on: its message is shown as is, beside `field` when given. */
export class UserError extends Error {
	constructor(
		message: string,
		readonly field?: string
	) {
		super(message);
	}
}
