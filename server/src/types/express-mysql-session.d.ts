// express-mysql-session ships without types; only the parts Evalon uses are declared.
declare module 'express-mysql-session' {
  import type * as expressSession from 'express-session';

  interface MySQLStoreOptions {
    clearExpired?: boolean;
    checkExpirationInterval?: number;
    expiration?: number;
    createDatabaseTable?: boolean;
    endConnectionOnClose?: boolean;
    disableTouch?: boolean;
    schema?: {
      tableName?: string;
      columnNames?: { session_id?: string; expires?: string; data?: string };
    };
  }

  interface MySQLStore extends expressSession.Store {
    onReady(): Promise<void>;
    close(): Promise<void>;
  }

  type MySQLStoreClass = new (options: MySQLStoreOptions, connection?: unknown) => MySQLStore;

  function createMySQLStore(session: unknown): MySQLStoreClass;
  export = createMySQLStore;
}
