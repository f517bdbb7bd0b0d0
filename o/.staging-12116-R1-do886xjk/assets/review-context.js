window.specgenReview = {"project": "NEW-001", "revision": "R1"};
