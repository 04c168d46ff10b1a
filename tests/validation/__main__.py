"""`python -m tests.validation [--readme]`: print (or write into the README) the table."""

import sys

from tests.validation import common

if __name__ == "__main__":
    if "--readme" in sys.argv[1:]:
        common.write_readme()
        print(f"wrote the section between {common.START} and {common.END} in {common.README}")
    else:
        sys.stdout.write(common.readme_section())
