// Integration tests expect scripts/test.sh to have started PostgreSQL and the fakes; unit tests need nothing.
export default function setup() {}
