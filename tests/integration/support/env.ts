/**
 * The services `npm test` (scripts/test.ts) starts for the integration and e2e suites, read
 * when asked for. Each getter fails with one clear message when the suite was started some
 * other way (plain `npx vitest`), instead of a connection error deep inside a test.
 *
 *   TEST_DATABASE_ADMIN_URL  superuser URL of a throwaway PostgreSQL (maintenance db "postgres")
 *   TEST_MAIL_API_URL        the SMTP fake's REST API (maildev: GET /email, DELETE /email/all)
 *   SMTP_URL, MAIL_FROM      where the app sends mail
 *   S3_ENDPOINT, S3_REGION, S3_BUCKET, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY
 *   AUTH_SECRET, STORAGE_EVENTS_SECRET
 *   E2E_BASE_URL, CHROMIUM_PATH, DATABASE_URL   (e2e stage only: the running app and its db)
 */
function required(name: string): string {
	const value = process.env[name];
	if (!value) {
		throw new Error(
			`${name} is not set: run this suite through \`npm test\` (scripts/test.ts), which starts ` +
				'PostgreSQL, the S3 fake and the SMTP fake and exports their addresses, e.g. ' +
				'`npm test -- --stage integration`.'
		);
	}
	return value;
}

export const testEnv = {
	get databaseAdminUrl() {
		return required('TEST_DATABASE_ADMIN_URL');
	},
	get mailApiUrl() {
		return required('TEST_MAIL_API_URL').replace(/\/$/, '');
	},
	get smtpUrl() {
		return required('SMTP_URL');
	},
	get mailFrom() {
		return required('MAIL_FROM');
	},
	get s3() {
		return {
			endpoint: required('S3_ENDPOINT'),
			region: required('S3_REGION'),
			bucket: required('S3_BUCKET'),
			accessKeyId: required('S3_ACCESS_KEY_ID'),
			secretAccessKey: required('S3_SECRET_ACCESS_KEY')
		};
	},
	get authSecret() {
		return required('AUTH_SECRET');
	},
	get storageEventsSecret() {
		return required('STORAGE_EVENTS_SECRET');
	},
	get e2eBaseUrl() {
		return required('E2E_BASE_URL').replace(/\/$/, '');
	}
};
